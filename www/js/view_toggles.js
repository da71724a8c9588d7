// The screen's page-only switches (mirror, hidden needle, overlay): they change what is drawn,
// never the scene.

const TOGGLES = [
  ["view.flip", "flip"],
  ["view.ghost", "ghost"],
  ["view.overlay", "overlay"],
];

export function wireViewToggles(state) {
  for (const [control, key] of TOGGLES) {
    const box = document.querySelector(`input[type="checkbox"][data-control="${control}"]`);
    if (!box) continue;
    box.checked = state.snap.view[key];
    const onChange = () => {
      if (state.snap.view[key] !== box.checked) state.setView(key, box.checked);
    };
    box.addEventListener("change", onChange);
    box.addEventListener("input", onChange);
  }
}
