// Page-wide keyboard shortcuts and the visible "Keys" list, from one table.

/** Probe and needle moves: key -> [scene path, direction]. Shift takes the big step. */
const MOVES = [
  { keys: ["a", "d"], path: "probe.pose.x_mm", what: "Slide probe, x − / +" },
  { keys: ["s", "w"], path: "probe.pose.y_mm", what: "Slide probe, y − / +" },
  { keys: ["q", "e"], path: "probe.pose.rotate_deg", what: "Rotate probe − / +" },
  { keys: ["f", "r"], path: "probe.pose.tilt_deg", what: "Tilt probe − / +" },
  { keys: ["z", "x"], path: "probe.pose.rock_deg", what: "Rock probe − / +" },
  { keys: ["b", "n"], path: "needle.inserted_mm", what: "Withdraw / advance needle" },
];

/** View toggles: key -> data-control of a checkbox. */
const TOGGLES = [
  { key: "m", control: "view.flip", what: "Mirror the screen" },
  { key: "h", control: "view.ghost", what: "Hidden needle on / off" },
  { key: "o", control: "view.overlay", what: "Overlay on / off" },
];

/** Keys of a rehearsal (rehearsal.js acts on them while one runs). */
export const REHEARSAL_KEYS = [
  { key: "t", what: "Rehearsal: \u201cthat is the tip\u201d" },
  { key: "g", what: "Rehearsal: \u201cthat is the shaft\u201d" },
];

/** Keys that only act where the focus is. */
const LOCAL = [
  { keys: "← →", what: "On a slider: one step; Shift or PageUp / PageDown: big step" },
  { keys: "← → ↑ ↓", what: "On the 3D view: turn; + / − zoom; 0 reset" },
  { keys: "Tab", what: "Next control" },
];

/** Whether a key press goes into a text field (and so is not a shortcut). */
export function typingInto(target) {
  if (!target || !target.tagName) return false;
  const tag = target.tagName.toLowerCase();
  if (tag === "textarea" || tag === "select") return true;
  if (tag === "input") {
    const type = (target.getAttribute("type") || "text").toLowerCase();
    return type !== "range" && type !== "checkbox" && type !== "button" && type !== "file";
  }
  return target.isContentEditable === true;
}

/** Listen for shortcuts on the document; `controls.nudge` moves a field by a step. */
export function installShortcuts(controls) {
  const byKey = new Map();
  for (const m of MOVES) {
    byKey.set(m.keys[0], { path: m.path, sign: -1 });
    byKey.set(m.keys[1], { path: m.path, sign: +1 });
  }
  const toggles = new Map(TOGGLES.map((t) => [t.key, t.control]));

  document.addEventListener("keydown", (ev) => {
    if (ev.ctrlKey || ev.metaKey || ev.altKey || ev.defaultPrevented) return;
    if (typingInto(ev.target)) return;
    const key = ev.key.length === 1 ? ev.key.toLowerCase() : "";
    const move = byKey.get(key);
    if (move) {
      const { step, big } = controls.steps(move.path);
      controls.nudge(move.path, move.sign * (ev.shiftKey ? big : step), ev.timeStamp);
      ev.preventDefault();
      return;
    }
    const control = toggles.get(key);
    if (control) {
      const box = document.querySelector(`input[type="checkbox"][data-control="${control}"]`);
      if (box && !box.disabled) {
        box.checked = !box.checked;
        box.dispatchEvent(new Event("change", { bubbles: true }));
        ev.preventDefault();
      }
    }
  });
}

function kbd(text) {
  const k = document.createElement("kbd");
  k.textContent = text;
  return k;
}

/** Fill the visible Keys list (a <dl>). */
export function renderKeyList(dl, controls) {
  const rows = [];
  for (const m of MOVES) {
    const { step, big } = controls.steps(m.path);
    const unit = m.path.endsWith("_deg") ? "°" : " mm";
    rows.push([[m.keys[0].toUpperCase(), m.keys[1].toUpperCase()], `${m.what} (${step}${unit}; Shift ${big}${unit})`]);
  }
  for (const t of TOGGLES) rows.push([[t.key.toUpperCase()], t.what]);
  for (const r of REHEARSAL_KEYS) rows.push([[r.key.toUpperCase()], r.what]);
  for (const l of LOCAL) rows.push([[l.keys], l.what]);
  for (const [keys, what] of rows) {
    const dt = document.createElement("dt");
    keys.forEach((k, i) => {
      if (i > 0) dt.append(" ");
      dt.append(kbd(k));
    });
    const dd = document.createElement("dd");
    dd.textContent = what;
    dl.append(dt, dd);
  }
}
