// Loads the WebAssembly core. The only module that imports the generated package.

import init, { Session, EchoView, wasmMemory, fieldLimits, version } from "../pkg/slicewise.js";

// The single-file build (cargo xtask dist) carries the wasm as base64, so it also works from
// file:// where fetching a sibling file is not allowed.
const b64 = globalThis.SLICEWISE_WASM_BASE64;
if (b64) { const bytes = Uint8Array.from(atob(b64), c => c.charCodeAt(0)); await init({ module_or_path: bytes }); } else { await init(); }

/** Numeric limits by scene path pattern: Map(pattern -> [min, max]). */
export function limitsByPath() {
  const out = new Map();
  for (const [pattern, min, max] of fieldLimits()) out.set(pattern, [min, max]);
  return out;
}

export { Session, EchoView, wasmMemory, version };
