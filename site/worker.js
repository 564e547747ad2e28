// Worker bootstrap, appended to Go's wasm_exec.js by the bundler. The page sends the engine as
// base64 text of the gzip'd module; it is decoded, decompressed as a stream and compiled while it
// arrives. Every later message goes to the Go handler (wasm/main.go).
'use strict';
function decodeBase64(text) {
  if (typeof Uint8Array.fromBase64 === 'function') return Uint8Array.fromBase64(text.trim());
  const bin = atob(text.trim());
  const out = new Uint8Array(bin.length);
  for (let i = 0; i < bin.length; i++) out[i] = bin.charCodeAt(i);
  return out;
}
self.onmessage = async (event) => {
  const m = event.data;
  if (m && m.kind === 'boot') {
    try {
      const go = new Go();
      const gz = new Blob([decodeBase64(m.engine)]).stream().pipeThrough(new DecompressionStream('gzip'));
      const wasm = new Response(gz, { headers: { 'Content-Type': 'application/wasm' } });
      const { instance } = await WebAssembly.instantiateStreaming(wasm, go.importObject);
      go.run(instance);
    } catch (err) {
      self.postMessage({ v: 1, id: 0, kind: 'error', json: JSON.stringify({ message: 'The engine could not start: ' + err }) });
    }
    return;
  }
  self.tracewrightHandle(m);
};
