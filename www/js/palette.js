// Canvas colours shared by every view, so one thing has one colour everywhere.
// Hues from a colour-blind-safe set; shapes and line styles also tell things apart.

export const COLOURS = {
  screenOut: "#1a1b1e", // canvas outside the field of view
  screenIn: "#07090b", // inside the field of view (under any simulated image)
  air: "#111316", // field of view above the skin line
  layerLine: "rgba(214, 200, 170, 0.22)",
  layerText: "rgba(214, 200, 170, 0.45)",
  frameLine: "rgba(236, 226, 206, 0.55)",
  frameText: "rgba(236, 226, 206, 0.8)",
  frameTick: "rgba(236, 226, 206, 0.5)",
  marker: "#E69F00", // orientation-marker side
  slab: "#56B4E9", // the beam slab, everywhere
  slabFill: "rgba(86, 180, 233, 0.20)",
  slabFillStrong: "rgba(86, 180, 233, 0.38)",
  needle: "#F0E442", // the needle's in-slab part
  needleHalo: "rgba(240, 228, 66, 0.28)",
  ghost: "#CC79A7", // the needle the slab does not show
  shaft: "rgba(226, 220, 206, 0.75)", // needle in the 3D view outside the slab (before the last in-slab point)
  nerve: "#009E73",
  nerveFill: "rgba(0, 158, 115, 0.22)",
  vessel: "#D55E00",
  vesselFill: "rgba(213, 94, 0, 0.16)",
  fluid: "#4aa3df",
  fluidFill: "rgba(0, 114, 178, 0.35)",
  bone: "#EDE6D6",
  boneShadow: "rgba(0, 0, 0, 0.55)",
  skin: "rgba(233, 214, 186, 0.16)",
  skinLine: "rgba(233, 214, 186, 0.35)",
  probe: "#c9bfae",
  probeEdge: "#6f6557",
};

/** Stroke and fill of a structure kind. */
export function kindStyle(kind) {
  switch (kind) {
    case "nerve": return { stroke: COLOURS.nerve, fill: COLOURS.nerveFill };
    case "vessel": return { stroke: COLOURS.vessel, fill: COLOURS.vesselFill };
    case "fluid": return { stroke: COLOURS.fluid, fill: COLOURS.fluidFill };
    case "bone": return { stroke: COLOURS.bone, fill: "rgba(237, 230, 214, 0.15)" };
    default: return { stroke: "#bbbbbb", fill: "rgba(187,187,187,0.15)" };
  }
}
