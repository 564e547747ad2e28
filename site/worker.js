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

// The file is read on a thread of its own: a nested worker reads slices with FileReaderSync and
// hands each one over (transferred, not copied). Read here, a slice would need this thread's
// event loop, which is busy while the engine parses, so reading and parsing would take turns.
// Where a worker cannot start one (an older browser), slices are read here.
const READER = 'onmessage=(e)=>{const m=e.data;try{const b=new FileReaderSync().readAsArrayBuffer(m.file.slice(m.start,m.end));postMessage({id:m.id,buf:b},[b]);}catch(err){postMessage({id:m.id,error:String(err)});}};';
let reader = null;
let readerFailed = false;
let nextRead = 1;
const reads = new Map();
function readHere(r) { r.file.slice(r.start, r.end).arrayBuffer().then(r.resolve, r.reject); }
function startReader() {
  try {
    const url = URL.createObjectURL(new Blob([READER], { type: 'text/javascript' }));
    reader = new Worker(url);
    URL.revokeObjectURL(url);
  } catch (err) {
    readerFailed = true;
    reader = null;
    return;
  }
  reader.onmessage = (e) => {
    const r = reads.get(e.data.id);
    if (!r) return;
    reads.delete(e.data.id);
    if (e.data.error) r.reject(new Error(e.data.error)); else r.resolve(e.data.buf);
  };
  reader.onerror = (e) => {
    if (e && e.preventDefault) e.preventDefault();
    readerFailed = true;
    reader = null;
    for (const r of reads.values()) readHere(r);
    reads.clear();
  };
}
self.tracewrightReadSlice = (file, start, end) => new Promise((resolve, reject) => {
  const r = { file, start, end, resolve, reject };
  if (!reader && !readerFailed) startReader();
  if (!reader) { readHere(r); return; }
  const id = nextRead++;
  reads.set(id, r);
  reader.postMessage({ id, file, start, end });
});
