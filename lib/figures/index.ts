export { profileSvg } from "./profile-figure.js";
export { chromaticitySvg, chromaticityFigureSources, spectrumLocus, LOCUS_LABELS_NM, type LocusPoint } from "./chromaticity-figure.js";
export { sizeMapSvg, sizeMapRaster, SIZE_MAP_SOURCES, logSpacedRadii, type SizeMapData } from "./size-map-figure.js";
export { scenarioSentence, srgbColours, type FigureProfile, type FigureRequest } from "./figure-input.js";
export { escapeXml } from "./svg.js";
