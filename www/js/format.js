// Number and sentence formatting for people; raw values for the data-value hooks.

const MINUS = "\u2212";

/** Fixed decimals with a real minus sign; "—" for null or not finite. */
export function num(v, digits = 1) {
  if (v === null || v === undefined || !Number.isFinite(v)) return "—";
  const s = Math.abs(v).toFixed(digits);
  // Avoid "−0.0".
  const isZero = Number(s) === 0;
  return (v < 0 && !isZero ? MINUS : "") + s;
}

/** Signed, with "+" for positive values ("+2.5"). */
export function signed(v, digits = 1) {
  if (v === null || v === undefined || !Number.isFinite(v)) return "—";
  const s = num(v, digits);
  return v > 0 && Number(Math.abs(v).toFixed(digits)) !== 0 ? "+" + s : s;
}

/** "6.2 mm"; "—" when missing. */
export function mm(v, digits = 1) {
  const s = num(v, digits);
  return s === "—" ? s : s + " mm";
}

/** "+2.5 mm". */
export function signedMm(v, digits = 1) {
  const s = signed(v, digits);
  return s === "—" ? s : s + " mm";
}

/** "43°". */
export function deg(v, digits = 0) {
  const s = num(v, digits);
  return s === "—" ? s : s + "\u00b0";
}

/** Digits that suit a length: finer for small values. */
export function mmAuto(v) {
  if (v === null || v === undefined || !Number.isFinite(v)) return "—";
  return mm(v, Math.abs(v) < 1 ? 2 : 1);
}

/** The raw machine value for a data-value attribute: empty for null. */
export function raw(v) {
  if (v === null || v === undefined) return "";
  if (typeof v === "number") return Number.isFinite(v) ? String(v) : "";
  return String(v);
}

/** A number as an input field shows it: at most 3 decimals, no trailing zeros. */
export function inputValue(v) {
  if (!Number.isFinite(v)) return "";
  return String(Math.round(v * 1000) / 1000);
}

/** Which side of the centre plane an elevation offset lies on, in words. */
export function sideWords(e) {
  if (!Number.isFinite(e) || Math.abs(e) < 0.05) return "on the centre plane";
  return e > 0 ? "on the +elevation side" : "on the \u2212elevation side";
}

/**
 * The signature as a headline and a detail line, in plain words.
 * `n` is the report's needle object.
 */
export function signatureWords(n) {
  const hidden = mm(n.hidden_length_mm);
  const off = mm(Math.abs(n.tip_offset_mm));
  switch (n.signature) {
    case "none":
      return {
        headline: "Needle not in the slab",
        detail: n.hidden_length_mm > 0
          ? `Nothing of the needle is on screen; its tip lies ${off} off the centre plane, ${sideWords(n.tip_offset_mm)}.`
          : "No needle is inserted yet.",
      };
    case "shaft-dot":
      return {
        headline: `Shaft only \u2014 the tip is ${hidden} past the slab`,
        detail: `The bright dot is the shaft crossing the slab. The real tip lies ${off} off the centre plane, ${sideWords(n.tip_offset_mm)}.`,
      };
    case "tip-double-dot":
      return {
        headline: "Tip in view \u2014 a double dot (heel and point)",
        detail: `The bevel is inside the slab; the tip lies ${mmAuto(Math.abs(n.tip_offset_mm))} from the centre plane.`,
      };
    case "line-without-tip":
      return {
        headline: `Line ends ${hidden} short of the tip`,
        detail: `The last ${hidden} of needle has left the slab; on screen the real tip is ${mm(n.apparent_to_true_tip_mm)} from where the line stops.`,
      };
    case "line-with-tip":
      return {
        headline: "Tip in view \u2014 the line runs to the real tip",
        detail: n.plane_angle_deg < 0.05
          ? "The needle lies in the image plane and the bevel is inside the slab."
          : `The bevel is inside the slab; the needle runs ${deg(n.plane_angle_deg, 1)} out of the image plane.`,
      };
    default:
      return { headline: String(n.signature), detail: "" };
  }
}

/** Kind of a structure section in words. */
export function cutWords(section) {
  if (!section) return "not cut by the plane";
  const [minor, major] = section.semi_axes_mm;
  if (section.shape === "band") return `long-axis band, ${num(2 * minor, 1)} mm wide`;
  const ratio = major / minor;
  const kind = ratio < 1.15 ? "short-axis" : "oblique";
  return `${kind}, ${num(2 * minor, 1)}\u00d7${num(2 * major, 1)} mm`;
}
