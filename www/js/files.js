// Scene files: the demo picker, opening a file (file input or drop on the page) and saving
// the current scene as a .scene.json download. A bad file leaves the current scene in place.

import { DEMOS } from "../pkg/demos.js";

const OPENED = "__opened__";

function titleOf(text, fallback) {
  try {
    const t = JSON.parse(text).title;
    return typeof t === "string" && t ? t : fallback;
  } catch {
    return fallback;
  }
}

function fileSlug(title) {
  const slug = String(title || "scene").toLowerCase().replace(/[^a-z0-9]+/g, "-").replace(/^-+|-+$/g, "");
  return (slug || "scene").slice(0, 60) + ".scene.json";
}

/** The demo to start with: the one that shows the misleading shaft dot, else the first. */
export function firstDemo() {
  return DEMOS.find((d) => d.file === "shaft-dot-past-nerve.scene.json") || DEMOS[0];
}

export function createFiles({ state, select, fileInput, saveButton, dropTarget, dropHint }) {
  for (const d of DEMOS) {
    const opt = document.createElement("option");
    opt.value = d.file;
    opt.textContent = titleOf(d.text, d.file);
    select.append(opt);
  }
  // An opened file gets its own entry while it is the current scene (the list otherwise
  // holds exactly the demo files).
  const opened = document.createElement("option");
  opened.value = OPENED;
  opened.disabled = true;
  let current = select.value;
  let locked = false; // a rehearsal holds the scene

  function markOpened(name) {
    opened.textContent = `Your file: ${name}`;
    if (!opened.isConnected) select.append(opened);
    select.value = OPENED;
    current = OPENED;
  }

  const onPick = (ev) => {
    const demo = DEMOS.find((d) => d.file === select.value);
    if (!demo || select.value === current) return;
    if (state.load(demo.text, demo.file, ev.timeStamp)) {
      current = demo.file;
      opened.remove();
    } else {
      select.value = current;
    }
  };
  select.addEventListener("input", onPick);
  select.addEventListener("change", onPick);

  async function openFile(file, t) {
    if (!file) return;
    let text;
    try {
      text = await file.text();
    } catch (e) {
      state.setError(`Could not read ${file.name}: ${e && e.message ? e.message : e}`);
      return;
    }
    if (state.load(text, file.name, t)) markOpened(file.name);
  }

  fileInput.addEventListener("change", (ev) => {
    const file = fileInput.files && fileInput.files[0];
    openFile(file, ev.timeStamp).finally(() => { fileInput.value = ""; });
  });

  // Drop a scene file anywhere on the page.
  let depth = 0;
  const hasFiles = (ev) => ev.dataTransfer && [...ev.dataTransfer.types].includes("Files");
  dropTarget.addEventListener("dragenter", (ev) => {
    if (!hasFiles(ev)) return;
    ev.preventDefault();
    depth++;
    dropHint.hidden = false;
  });
  dropTarget.addEventListener("dragover", (ev) => {
    if (!hasFiles(ev)) return;
    ev.preventDefault();
    ev.dataTransfer.dropEffect = "copy";
  });
  dropTarget.addEventListener("dragleave", () => {
    depth = Math.max(0, depth - 1);
    if (depth === 0) dropHint.hidden = true;
  });
  dropTarget.addEventListener("drop", (ev) => {
    if (!hasFiles(ev)) return;
    ev.preventDefault();
    depth = 0;
    dropHint.hidden = true;
    if (locked) {
      state.setError("Leave the rehearsal before opening another scene.");
      return;
    }
    openFile(ev.dataTransfer.files[0], ev.timeStamp);
  });

  saveButton.addEventListener("click", () => {
    const text = state.session.save();
    const blob = new Blob([text], { type: "application/json" });
    const url = URL.createObjectURL(blob);
    const a = document.createElement("a");
    a.href = url;
    a.download = current !== OPENED && current ? current : fileSlug(state.snap.scene.title);
    document.body.append(a);
    a.click();
    a.remove();
    setTimeout(() => URL.revokeObjectURL(url), 1000);
  });

  return {
    /** Select a demo in the picker without loading it (the first scene at start-up). */
    showDemo(file) { select.value = file; current = file; },
    /** While a rehearsal runs the scene may not be swapped (picker, file, drop, save). */
    setLocked(on) {
      locked = on;
      select.disabled = on;
      fileInput.disabled = on;
      saveButton.disabled = on;
      fileInput.closest("label").classList.toggle("is-disabled", on);
    },
  };
}
