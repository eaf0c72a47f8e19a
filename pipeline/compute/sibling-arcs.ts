// Several places along the bow from one pass: drops whose canting mean is taken by rotation over the pupil
// (lib/bow/canting-rotation.ts) give the rows of any number of arc positions from the same rays. A request that is
// the first of a series along the arc (a camera view's arc nodes, a lookup texture's arc slices) asks for all of
// them (ShapedRowSpec.siblingArcsDeg); the kernel cache keeps the others' rows, which the later members find there.

import { quantiseSpec } from "../../lib/bow/shaped-rows.js";
import type { KernelRequest } from "../kernels/kernel-service.js";

/** Whether any drop of the request takes the canting mean by rotation. */
export function asksRotation(request: KernelRequest): boolean {
  return request.shapes?.some((spec) => spec?.cantingRotation === true) ?? false;
}

/** The request with its rotation specs asking for the rows at arcsDeg too (quantised as the specs at those places are). */
export function withSiblingArcs(request: KernelRequest, arcsDeg: readonly number[]): KernelRequest {
  if (!asksRotation(request)) return request;
  return {
    ...request,
    shapes: request.shapes!.map((spec) =>
      spec?.cantingRotation ? { ...spec, siblingArcsDeg: arcsDeg.map((arc) => quantiseSpec({ ...spec, arcPositionDeg: arc }).arcPositionDeg) } : spec,
    ),
  };
}
