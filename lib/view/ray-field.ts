/** One world direction per pixel: a camera or a sky map. */
export interface RayField {
  widthPx: number;
  heightPx: number;
  /** Unit direction through the centre of pixel (x, y) into out; false where the pixel sees nothing. */
  ray(x: number, y: number, out: Float64Array): boolean;
}
