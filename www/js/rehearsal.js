// Rehearsal mode: the truth is hidden (overlay off and locked; 3D, edge-on, readouts, capture
// and plots out of sight) and only the simulated screen remains. The needle advances by key
// (N, the scene's step) or at the scene's steady pace, from the scene's inserted length for the
// scene's advance (or to the needle's end), within its time limit. The user moves the probe with
// the usual keys and says what the screen shows (T: tip, G: shaft). Every advance step, probe
// move and call is logged; at the end session.scoreRehearsal scores the log and the replay is
// drawn. Leaving puts the needle and probe back where they were and shows the truth again.

import { showReadout } from "./readouts.js";
import { typingInto } from "./shortcuts.js";
import { drawReplay } from "./replay_plot.js";
import { setupPlot, PLOT } from "./plot.js";
import { mm, num } from "./format.js";

const STATE_WORDS = { idle: "Exploring", running: "Rehearsing", done: "Rehearsal done" };
const DECLARE_KEYS = { t: "tip", g: "shaft" };

function clock(s) {
  const t = Math.max(0, Math.floor(s));
  return `${Math.floor(t / 60)}:${String(t % 60).padStart(2, "0")}`;
}

function percent(v) {
  return Number.isFinite(v) ? `${Math.round(v * 100)} %` : "—";
}

function slug(title) {
  return String(title || "scene").toLowerCase().replace(/[^a-z0-9]+/g, "-").replace(/^-+|-+$/g, "").slice(0, 50) || "scene";
}

function download(blob, name) {
  const url = URL.createObjectURL(blob);
  const a = document.createElement("a");
  a.href = url;
  a.download = name;
  document.body.append(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 1000);
}

/**
 * Wire rehearsal mode. `parts`: { state, controls, files, capture, walk, needleControls (the
 * needle group's container), overlayBox (the view.overlay checkbox) }.
 */
export function createRehearsal(parts) {
  const { state, controls, files, capture, walk, needleControls, overlayBox } = parts;
  const $ = (sel) => document.querySelector(sel);
  const body = document.body;
  const card = $("#rehearsal-card");
  const runningPart = card.querySelector("[data-rehearsal-running]");
  const donePart = card.querySelector("[data-rehearsal-done]");
  const paceLine = card.querySelector("[data-rehearsal-pace]");
  const lastLine = card.querySelector("[data-rehearsal-last]");
  const advanceButton = card.querySelector('[data-control="rehearsal.advance"]');
  const startButton = $('[data-control="rehearsal.start"]');
  const stopButton = $('[data-control="rehearsal.stop"]');
  const stateEl = $('[data-readout="rehearsal.state"]');
  const status = $("[data-rehearsal-status]");
  const rsWords = status.querySelector("[data-rs-words]");
  const rsAdvance = status.querySelector("[data-rs-advance]");
  const rsTotal = status.querySelector("[data-rs-advance-total]");
  const rsBar = status.querySelector("[data-rs-advance-bar]");
  const rsTime = status.querySelector("[data-rs-time]");
  const rsLimit = status.querySelector("[data-rs-time-limit]");
  const replayCanvas = $("#replay-canvas");
  const summary = card.querySelector("[data-rehearsal-summary]");
  const targetName = card.querySelector("[data-rehearsal-target]");
  const scoreEls = {};
  for (const key of ["confirmed_share", "tip_in_view_share", "longest_blind_mm", "false_tip_calls", "final_tip_to_target_mm"]) {
    scoreEls[key] = card.querySelector(`[data-readout="rehearsal.score.${key}"]`);
  }

  let phase = "idle";
  let run = null; // { settings, startMm, endMm, t0, events, before: {...}, sceneAtStart, startedAt }
  let score = null;
  let stepTimer = 0;
  let clockTimer = 0;

  function setPhase(p) {
    phase = p;
    showReadout(stateEl, p, STATE_WORDS[p]);
    body.dataset.mode = p === "idle" ? "explore" : "rehearsal";
    card.hidden = p === "idle";
    runningPart.hidden = p !== "running";
    donePart.hidden = p !== "done";
    status.hidden = p === "idle";
    startButton.disabled = p !== "idle";
    stopButton.textContent = p === "done" ? "Back to exploring" : "Stop here and score";
    const locked = p !== "idle";
    files.setLocked(locked);
    controls.setEnabled(needleControls, !locked);
    capture.setActive(!locked);
    walk.setActive(!locked);
  }

  function elapsed() {
    return run ? (performance.now() - run.t0) / 1000 : 0;
  }

  function pose() {
    const p = state.value("probe.pose");
    return { x_mm: p.x_mm, y_mm: p.y_mm, rotate_deg: p.rotate_deg, tilt_deg: p.tilt_deg, rock_deg: p.rock_deg };
  }

  function log(declared = null) {
    run.events.push({
      t_s: Math.round(elapsed() * 1000) / 1000,
      inserted_mm: state.value("needle.inserted_mm"),
      pose: pose(),
      declared,
    });
  }

  function showProgress() {
    if (!run) return;
    const done = state.value("needle.inserted_mm") - run.startMm;
    const total = run.endMm - run.startMm;
    rsAdvance.textContent = num(done, 1);
    rsTotal.textContent = num(total, 1);
    rsBar.style.width = `${Math.min(100, Math.max(0, (100 * done) / total))}%`;
    rsTime.textContent = clock(elapsed());
    rsLimit.textContent = clock(run.settings.time_limit_s);
  }

  function start(ev) {
    if (phase !== "idle") return;
    const scene = state.snap.scene;
    const settings = scene.rehearsal;
    const startMm = scene.needle.inserted_mm;
    const endMm = Math.min(scene.needle.length_mm, startMm + settings.advance_mm);
    if (endMm - startMm < 1e-6) {
      state.setError("The needle is already at its full length: withdraw it before a rehearsal (needle.inserted_mm).");
      return;
    }
    state.setError("");
    run = {
      settings,
      startMm,
      endMm,
      t0: performance.now(),
      events: [],
      startedAt: new Date().toISOString(),
      sceneAtStart: JSON.parse(state.session.save()),
      before: { inserted_mm: startMm, pose: pose(), overlay: state.snap.view.overlay },
    };
    score = null;
    setPhase("running");
    // Overlay off and locked: only what a real screen shows.
    overlayBox.checked = false;
    overlayBox.disabled = true;
    state.setView("overlay", false);
    const steady = settings.advance === "steady";
    advanceButton.hidden = steady;
    paceLine.textContent = steady
      ? `The needle advances by itself at ${num(settings.pace_mm_s, 1)} mm/s, ${num(settings.step_mm, 1)} mm at a time, for ${mm(endMm - startMm)}.`
      : `Press N (or Advance) to push the needle ${mm(settings.step_mm)}, up to ${mm(endMm - startMm)} in all; B (withdraw) is off.`;
    rsWords.textContent = steady ? "The needle is advancing: keep its tip in view." : "Advance with N; keep the tip in view.";
    lastLine.textContent = "";
    log(null);
    showProgress();
    if (steady) {
      const every = Math.max(50, (1000 * settings.step_mm) / settings.pace_mm_s);
      stepTimer = setInterval(() => advance(), every);
    }
    clockTimer = setInterval(() => {
      showProgress();
      if (elapsed() >= run.settings.time_limit_s) finish("time");
    }, 200);
    const focusTarget = card.querySelector('[data-control="rehearsal.declare_tip"]');
    if (focusTarget && ev && ev.detail === 0) focusTarget.focus(); // keyboard start: keep focus in the card
  }

  function advance(t) {
    if (phase !== "running") return;
    const cur = state.value("needle.inserted_mm");
    const next = Math.min(run.endMm, Math.round((cur + run.settings.step_mm) * 1e6) / 1e6);
    if (next <= cur) return;
    controls.set("needle.inserted_mm", next, t); // logged by onApplied
    showProgress();
    if (next >= run.endMm - 1e-9) finish("advance");
  }

  function declare(kind) {
    if (phase !== "running") return;
    log(kind);
    const at = num(state.value("needle.inserted_mm"), 1);
    lastLine.textContent = `You said \u201c${kind === "tip" ? "tip" : "shaft"}\u201d at ${at} mm inserted (${clock(elapsed())}).`;
  }

  function finish(reason) {
    if (phase !== "running") return;
    clearInterval(stepTimer);
    clearInterval(clockTimer);
    showProgress();
    run.reason = reason;
    run.duration_s = elapsed();
    const target = run.settings.target || undefined;
    try {
      score = state.session.scoreRehearsal(run.events, target);
    } catch (e) {
      score = null;
      state.setError(e && e.message ? e.message : String(e));
    }
    setPhase("done");
    rsWords.textContent = reason === "time" ? "Time is up." : reason === "stopped" ? "Stopped." : "The advance is done.";
    showScore();
    // The run is over: show the truth on the final frame.
    overlayBox.disabled = false;
    overlayBox.checked = true;
    state.setView("overlay", true);
    stopButton.focus({ preventScroll: true });
    summary.scrollIntoView({ block: "nearest" });
  }

  function showScore() {
    const s = score;
    const words = {
      confirmed_share: (v) => percent(v),
      tip_in_view_share: (v) => percent(v),
      longest_blind_mm: (v) => mm(v),
      false_tip_calls: (v) => String(v),
      final_tip_to_target_mm: (v) => (v === null || v === undefined ? "—" : v < 0 ? `${mm(-v)} inside` : mm(v)),
    };
    for (const [key, el] of Object.entries(scoreEls)) {
      const v = s ? s[key] : null;
      showReadout(el, v, s ? words[key](v) : "—");
    }
    targetName.textContent = s && s.target_id ? s.target_id : "target";
    if (s) {
      const how = run.reason === "time" ? "Time ran out after" : run.reason === "stopped" ? "Stopped after" : "Advanced";
      summary.textContent = `${how} ${mm(s.advance_mm)} in ${clock(run.duration_s)}. Tip calls: ${s.correct_tip_calls} right, ${s.false_tip_calls} wrong; shaft calls: ${s.correct_shaft_calls} right, ${s.wrong_shaft_calls} wrong.`;
    } else {
      summary.textContent = "The log could not be scored.";
    }
    drawOnPage();
  }

  function drawOnPage() {
    const p = setupPlot(replayCanvas);
    if (!p) return;
    drawReplay(p.ctx, p.w, p.h, score);
  }

  function leave(ev) {
    if (phase === "idle") return;
    clearInterval(stepTimer);
    clearInterval(clockTimer);
    const before = run ? run.before : null;
    setPhase("idle");
    overlayBox.disabled = false;
    if (before) {
      // The needle and probe go back to where the rehearsal started; the rest of the scene
      // (display settings and all) stays as it is.
      const t = ev ? ev.timeStamp : undefined;
      state.apply("needle.inserted_mm", before.inserted_mm, t);
      state.apply("probe.pose", before.pose, t);
      controls.sync();
      overlayBox.checked = before.overlay;
      state.setView("overlay", before.overlay);
    }
    startButton.focus({ preventScroll: true });
  }

  function exportJson() {
    if (!run) return;
    const doc = {
      format: "slicewise-rehearsal-log",
      version: 1,
      note: "A rehearsal on an invented scene; a good score is rehearsal, not clinical competence.",
      started_at: run.startedAt,
      scene: run.sceneAtStart,
      settings: run.settings,
      start_inserted_mm: run.startMm,
      end_inserted_mm: run.endMm,
      ended_by: run.reason || null,
      duration_s: run.duration_s ?? null,
      events: run.events,
      score,
    };
    const blob = new Blob([JSON.stringify(doc, null, 2) + "\n"], { type: "application/json" });
    download(blob, `rehearsal-${slug(state.snap.scene.title)}.json`);
  }

  function exportPng() {
    const W = 1080, H = 600;
    const c = document.createElement("canvas");
    c.width = W;
    c.height = H;
    const ctx = c.getContext("2d");
    ctx.fillStyle = PLOT.background;
    ctx.fillRect(0, 0, W, H);
    const title = `Rehearsal replay \u2014 ${state.snap.scene.title || "scene"}`;
    drawReplay(ctx, W, H - 34, score, { title, big: true });
    ctx.font = "15px system-ui, sans-serif";
    ctx.fillStyle = PLOT.text;
    ctx.textBaseline = "middle";
    ctx.textAlign = "left";
    ctx.fillText("Orange: your tilt.  Dashed blue: the tilt that centres the tip; band: tip in the slab.  Disc: call right; cross: call wrong (T tip, S shaft).", 18, H - 18);
    c.toBlob((blob) => { if (blob) download(blob, `rehearsal-replay-${slug(state.snap.scene.title)}.png`); }, "image/png");
  }

  // Every probe move and needle step while running is a logged moment.
  state.onApplied((path) => {
    if (phase !== "running") return;
    if (path === "needle.inserted_mm" || path.startsWith("probe.pose")) log(null);
  });

  // Keys first (capture phase): the rehearsal owns N, B, T, G and the overlay key while running.
  window.addEventListener("keydown", (ev) => {
    if (phase !== "running" || ev.ctrlKey || ev.metaKey || ev.altKey || typingInto(ev.target)) return;
    const key = ev.key.length === 1 ? ev.key.toLowerCase() : "";
    if (key === "n") {
      if (run.settings.advance !== "steady") advance(ev.timeStamp);
    } else if (key === "b" || key === "o") {
      // No withdrawing during a run; the overlay stays off.
    } else if (DECLARE_KEYS[key]) {
      if (!ev.repeat) declare(DECLARE_KEYS[key]);
    } else {
      return;
    }
    ev.preventDefault();
    ev.stopPropagation();
  }, true);

  startButton.addEventListener("click", start);
  // Stop: while running, end the run here and score it; once scored, leave the mode.
  stopButton.addEventListener("click", (ev) => {
    if (phase === "running") finish("stopped");
    else leave(ev);
  });
  card.querySelector('[data-control="rehearsal.declare_tip"]').addEventListener("click", () => declare("tip"));
  card.querySelector('[data-control="rehearsal.declare_shaft"]').addEventListener("click", () => declare("shaft"));
  advanceButton.addEventListener("click", (ev) => advance(ev.timeStamp));
  card.querySelector('[data-control="rehearsal.export_json"]').addEventListener("click", exportJson);
  card.querySelector('[data-control="rehearsal.export_png"]').addEventListener("click", exportPng);
  new ResizeObserver(() => { if (phase === "done") drawOnPage(); }).observe(replayCanvas);

  setPhase("idle");

  globalThis.slicewise.rehearsal = {
    /** The current phase and, during or after a run, its log and score (for tests). */
    get phase() { return phase; },
    get events() { return run ? run.events : []; },
    get score() { return score; },
  };
}
