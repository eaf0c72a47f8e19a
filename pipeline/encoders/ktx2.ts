// KTX 2.0 textures (Khronos Group, "KTX File Format Specification", version 2.0) of linear RGBA floats, for
// engines that load textures as they are. The container is written by ktx-parse; what goes into it (format,
// data format descriptor, key/value data) is ours.
import {
  write,
  KHR_DF_KHR_DESCRIPTORTYPE_BASICFORMAT,
  KHR_DF_VENDORID_KHRONOS,
  KHR_DF_VERSION,
  KHR_DF_MODEL_RGBSDA,
  KHR_DF_TRANSFER_LINEAR,
  KHR_DF_FLAG_ALPHA_PREMULTIPLIED,
  KHR_DF_PRIMARIES_ACESCC,
  KHR_DF_PRIMARIES_BT709,
  KHR_DF_PRIMARIES_CIEXYZ,
  KHR_DF_CHANNEL_RGBSDA_RED,
  KHR_DF_CHANNEL_RGBSDA_GREEN,
  KHR_DF_CHANNEL_RGBSDA_BLUE,
  KHR_DF_CHANNEL_RGBSDA_ALPHA,
  KHR_DF_SAMPLE_DATATYPE_FLOAT,
  KHR_DF_SAMPLE_DATATYPE_SIGNED,
  KHR_SUPERCOMPRESSION_NONE,
  VK_FORMAT_R16G16B16A16_SFLOAT,
  VK_FORMAT_R32G32B32A32_SFLOAT,
  type KTX2Container,
  type Primaries,
} from "ktx-parse";
import { halfBitsFromNumber } from "./half-float.js";

export type Ktx2Space = "acescg" | "srgb-linear" | "xyz-d65";

/**
 * Colour primaries of each linear space as the Khronos Data Format Specification 1.3, "colorPrimaries" (khr_df_primaries_e)
 * names them: ACEScg uses the ACES AP1 primaries, which the specification lists as ACEScc's.
 */
const PRIMARIES: Record<Ktx2Space, Primaries> = {
  acescg: KHR_DF_PRIMARIES_ACESCC,
  "srgb-linear": KHR_DF_PRIMARIES_BT709,
  "xyz-d65": KHR_DF_PRIMARIES_CIEXYZ,
};

export interface Ktx2Image {
  width: number;
  height: number;
  /** Array layers (1 for a plain 2D texture); layer k's texels follow layer k − 1's. */
  layers: number;
  /** RGBA, row-major from the top row, layer after layer. */
  rgba: Float32Array;
  pixelType: "half" | "float";
  space: Ktx2Space;
  /** Alpha is premultiplied (the texture composites as out = rgb + (1 − a)·background). */
  premultipliedAlpha: boolean;
  /** Our own key/value pairs (UTF-8 strings); KTX 2.0, "Key/Value Data", reserves keys beginning "KTX" and "ktx" for Khronos. */
  keyValues: Record<string, string>;
}

/** The four samples (R, G, B, A) of one texel, each a signed float of `bits` bits (Khronos Data Format Specification 1.3, "Sample information"). */
function floatSamples(bits: 16 | 32) {
  const channels = [KHR_DF_CHANNEL_RGBSDA_RED, KHR_DF_CHANNEL_RGBSDA_GREEN, KHR_DF_CHANNEL_RGBSDA_BLUE, KHR_DF_CHANNEL_RGBSDA_ALPHA];
  return channels.map((channel, k) => ({
    bitOffset: k * bits,
    // The descriptor stores the bit length less one (Khronos Data Format Specification 1.3, "bitLength").
    bitLength: bits - 1,
    channelType: channel | KHR_DF_SAMPLE_DATATYPE_FLOAT | KHR_DF_SAMPLE_DATATYPE_SIGNED,
    samplePosition: [0, 0, 0, 0],
    // For float samples the limits are the binary32 patterns of −1.0 and 1.0 (Khronos Data Format
    // Specification 1.3, "sampleLower" and "sampleUpper"); as signed 32-bit integers.
    sampleLower: 0xbf800000 | 0,
    sampleUpper: 0x3f800000,
  }));
}

export function encodeKtx2(image: Ktx2Image): Uint8Array {
  const bits = image.pixelType === "half" ? 16 : 32;
  const bytesPerTexel = (4 * bits) / 8;
  const texels = image.width * image.height * image.layers;
  const levelData = new Uint8Array(texels * bytesPerTexel);
  const view = new DataView(levelData.buffer);
  // KTX 2.0 stores every field and texel little-endian ("File Structure").
  for (let i = 0; i < 4 * texels; i++) {
    if (bits === 16) view.setUint16(2 * i, halfBitsFromNumber(image.rgba[i]), true);
    else view.setFloat32(4 * i, image.rgba[i], true);
  }
  const container: KTX2Container = {
    vkFormat: bits === 16 ? VK_FORMAT_R16G16B16A16_SFLOAT : VK_FORMAT_R32G32B32A32_SFLOAT,
    typeSize: bits / 8,
    pixelWidth: image.width,
    pixelHeight: image.height,
    pixelDepth: 0,
    // KTX 2.0, "layerCount": 0 means not an array texture.
    layerCount: image.layers > 1 ? image.layers : 0,
    faceCount: 1,
    levelCount: 1,
    supercompressionScheme: KHR_SUPERCOMPRESSION_NONE,
    levels: [{ levelData, uncompressedByteLength: levelData.byteLength }],
    dataFormatDescriptor: [
      {
        vendorId: KHR_DF_VENDORID_KHRONOS,
        descriptorType: KHR_DF_KHR_DESCRIPTORTYPE_BASICFORMAT,
        versionNumber: KHR_DF_VERSION,
        colorModel: KHR_DF_MODEL_RGBSDA,
        colorPrimaries: PRIMARIES[image.space],
        transferFunction: KHR_DF_TRANSFER_LINEAR,
        flags: image.premultipliedAlpha ? KHR_DF_FLAG_ALPHA_PREMULTIPLIED : 0,
        texelBlockDimension: [0, 0, 0, 0],
        bytesPlane: [bytesPerTexel, 0, 0, 0, 0, 0, 0, 0],
        samples: floatSamples(bits),
      },
    ],
    // KTXorientation "rd": s grows to the right, t grows downwards, so row 0 is the top row (KTX 2.0, "KTXorientation").
    keyValue: { KTXorientation: "rd", ...image.keyValues },
    globalData: null,
  };
  return write(container);
}
