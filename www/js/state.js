// The session and its change notifications. Scene edits go through here; redraws are
// coalesced: the first change in an animation frame redraws at once, later ones in the same
// frame wait for the next requestAnimationFrame.

/** Scene paths the wasm fast path (setNumber) accepts without re-reading the whole scene. */
const FAST_PATHS = new Set([
  "probe.pose.x_mm", "probe.pose.y_mm", "probe.pose.rotate_deg", "probe.pose.tilt_deg",
  "probe.pose.rock_deg", "probe.frequency_mhz", "probe.depth_mm", "needle.inserted_mm",
  "needle.angle_deg", "needle.azimuth_deg", "needle.bevel_roll_deg", "needle.entry.x_mm",
  "needle.entry.y_mm", "display.gain_db", "display.dynamic_range_db", "display.doppler.scale_cm_s",
]);

/** Time a frame may spend on immediate redraws before further ones wait for the next frame. */
const FRAME_BUDGET_MS = 6;

/** Read a dotted scene path ("probe.pose.tilt_deg", "display.tgc_db[3]") from a plain object. */
export function getPath(obj, path) {
  let here = obj;
  for (const key of path.replace(/\[(\d+)\]/g, ".$1").split(".")) {
    if (here === null || typeof here !== "object") return undefined;
    here = here[key];
  }
  return here;
}

function setPath(obj, path, value) {
  const keys = path.split(".");
  let here = obj;
  for (let i = 0; i < keys.length - 1; i++) {
    if (here[keys[i]] === null || typeof here[keys[i]] !== "object") return;
    here = here[keys[i]];
  }
  here[keys[keys.length - 1]] = value;
}

/**
 * Create the page state around a wasm Session.
 * Listeners: onDraw(snapshot, what) for every redraw, onLoad(snapshot) after a scene load,
 * onError(message) whenever the error text changes, onApplied(path, value, t) after an edit
 * the scene took.
 */
export function createState(session) {
  const drawers = [];
  const loadListeners = [];
  const errorListeners = [];
  const appliedListeners = [];
  const perf = [];
  globalThis.slicewise = { session, perf };

  const snap = {
    scene: session.scene(),
    report: null,
    geometry: null,
    view: { flip: false, ghost: true, overlay: true },
    error: "",
    sceneLabel: "",
    // Counts scene changes (edits and loads), so views that cache work (the echo image, the
    // walk plots) know when theirs is stale; editTime is performance.now() of the last one.
    sceneSerial: 0,
    editTime: 0,
    // "number" for a numeric edit (slider, key, number field), "other" for any other edit,
    // "load" for a new scene: only runs of numeric edits count as a control being moved.
    editKind: "load",
  };

  // Work the drawers report inside one redraw (ms): wasm compute done while drawing (the echo
  // render) and the echo image's total (render + putImageData).
  const noted = { compute_ms: 0, echo_ms: 0 };

  let dirtyScene = true; // report + geometry need recomputing
  let pendingEvents = []; // event times of applied scene updates not yet drawn
  const pendingViews = new Set(); // view-only redraws asked for ("all", "scene3d", ...)
  let frameSpent = 0;
  let frameToken = 0;
  let frameArmed = false;
  let deferred = false;

  function redraw() {
    const t0 = performance.now();
    if (dirtyScene) {
      snap.report = session.section();
      snap.geometry = session.geometry();
    }
    const t1 = performance.now();
    const what = dirtyScene ? new Set(["all", ...pendingViews]) : new Set(pendingViews);
    dirtyScene = false;
    pendingViews.clear();
    noted.compute_ms = 0;
    noted.echo_ms = 0;
    for (const d of drawers) d(snap, what);
    const t2 = performance.now();
    // The echo render runs inside a drawer but is wasm compute: count it there, not as drawing.
    const compute = t1 - t0 + noted.compute_ms;
    const draw = Math.max(0, t2 - t1 - noted.compute_ms);
    for (const t of pendingEvents) {
      perf.push({ total_ms: t2 - t, compute_ms: compute, draw_ms: draw, echo_ms: noted.echo_ms });
    }
    pendingEvents = [];
    frameSpent += t2 - t0;
  }

  function onFrame(token) {
    if (token !== frameToken) return; // the other of rAF / timer already ran
    frameToken++;
    frameArmed = false;
    frameSpent = 0;
    if (deferred) {
      deferred = false;
      redraw();
      armFrame();
    }
  }

  function armFrame() {
    if (frameArmed) return;
    frameArmed = true;
    const token = frameToken;
    requestAnimationFrame(() => onFrame(token));
    // Background tabs get no animation frames; do not leave a change undrawn.
    setTimeout(() => onFrame(token), 120);
  }

  function schedule() {
    if (frameSpent < FRAME_BUDGET_MS && !deferred) {
      redraw();
    } else {
      deferred = true;
    }
    armFrame();
  }

  function setError(message) {
    if (snap.error === message) return;
    snap.error = message;
    for (const l of errorListeners) l(message);
  }

  function eventTime(t) {
    const now = performance.now();
    return Number.isFinite(t) && t > 0 && t <= now ? t : now;
  }

  return {
    snap,
    session,
    perf,

    /** Register a drawer: fn(snapshot, whatChanged:Set). */
    onDraw(fn) { drawers.push(fn); },
    onLoad(fn) { loadListeners.push(fn); },
    onError(fn) { errorListeners.push(fn); },
    onApplied(fn) { appliedListeners.push(fn); },

    /** Drawers report wasm work done while drawing (counted as compute) and echo time. */
    notePerf({ compute_ms = 0, echo_ms = 0 }) {
      noted.compute_ms += compute_ms;
      noted.echo_ms += echo_ms;
    },

    /** Current value of a scene path. */
    value(path) { return getPath(snap.scene, path); },

    /**
     * Apply one edit. Returns true when the scene took it; otherwise shows the message
     * naming the field and leaves the scene as it was.
     */
    apply(path, value, tEvent) {
      const t = eventTime(tEvent);
      try {
        if (typeof value === "number" && FAST_PATHS.has(path)) {
          session.setNumber(path, value);
          setPath(snap.scene, path, value);
        } else {
          session.set(path, value);
          snap.scene = session.scene();
        }
      } catch (e) {
        setError(e && e.message ? e.message : String(e));
        return false;
      }
      setError("");
      dirtyScene = true;
      snap.sceneSerial++;
      snap.editTime = performance.now();
      snap.editKind = typeof value === "number" ? "number" : "other";
      pendingEvents.push(t);
      for (const l of appliedListeners) l(path, value, t);
      schedule();
      return true;
    },

    /** Replace the scene with file text; on error the current scene stays. */
    load(text, label, tEvent) {
      const t = eventTime(tEvent);
      try {
        session.load(text);
      } catch (e) {
        const msg = e && e.message ? e.message : String(e);
        setError(label ? `Could not open ${label}: ${msg}` : msg);
        return false;
      }
      setError("");
      snap.scene = session.scene();
      snap.sceneLabel = label || "";
      dirtyScene = true;
      snap.sceneSerial++;
      snap.editTime = performance.now();
      snap.editKind = "load";
      pendingEvents.push(t);
      for (const l of loadListeners) l(snap);
      schedule();
      return true;
    },

    /** Show an error that did not come from the session (e.g. an unreadable file). */
    setError,

    /** Change a page-only view setting (flip, ghost, overlay) and redraw. */
    setView(key, value) {
      snap.view[key] = value;
      this.requestView("all");
    },

    /**
     * The user let go of a control (a committed "change"): work put off while it was moving
     * (the full-size echo frame, the walking schedule) is done in the next redraw.
     */
    settle() {
      pendingViews.add("settle");
      schedule();
    },

    /** Redraw one view (or "all") without touching the scene. */
    requestView(name) {
      pendingViews.add(name);
      schedule();
    },

    /** Draw now (first frame). */
    drawNow() {
      redraw();
      armFrame();
    },
  };
}
