// The exported figure's caption: what the figure shows (analysis, filter, order, scale) and where it comes
// from (run, Forkscape's version), drawn under its title and also written into the PNG file as text chunks
// (PNG specification, ISO/IEC 15948:2004, 11.3.4.3 tEXt: "Title", "Description", "Software"), so that a
// filtered figure cannot pass for the whole set.

/** The alternatives the filter drops, in words: "none" when it drops none. */
export function filterWords(layout, dropped) {
  const words = [];
  for (const f of layout.factors) {
    f.levels.forEach((label, level) => {
      if (!dropped.has(`${f.id}.${level}`)) return;
      words.push(f.control ? `${level === 1 ? 'with' : 'without'} ${f.name}` : `${f.name} = ${label}`);
    });
  }
  return words.length === 0 ? 'none (every specification of the scale shown)'
    : `specifications with ${words.join(', ')} left out`;
}

// CRC-32 of the PNG chunks (the polynomial the PNG specification, annex D, gives), table built once
const CRC_TABLE = Array.from({ length: 256 }, (_, n) => {
  let c = n;
  for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
  return c >>> 0;
});

function crc32(bytes) {
  let c = 0xffffffff;
  for (const b of bytes) c = CRC_TABLE[(c ^ b) & 0xff] ^ (c >>> 8);
  return (c ^ 0xffffffff) >>> 0;
}

/** One tEXt chunk: keyword, a zero byte, the text in Latin-1 (other characters become "?"). */
function textChunk(keyword, text) {
  const latin = (s) => Array.from(s, (ch) => (ch.codePointAt(0) < 256 ? ch.codePointAt(0) : 63));
  const data = [...latin(keyword), 0, ...latin(text)];
  const body = new Uint8Array(4 + data.length);
  body.set([0x74, 0x45, 0x58, 0x74]);
  body.set(data, 4);
  const chunk = new Uint8Array(12 + data.length);
  const view = new DataView(chunk.buffer);
  view.setUint32(0, data.length);
  chunk.set(body, 4);
  view.setUint32(8 + data.length, crc32(body));
  return chunk;
}

/** The PNG with the given text chunks inserted after its header chunk (signature 8 bytes, IHDR 25). */
export async function withText(png, texts) {
  const bytes = new Uint8Array(await png.arrayBuffer());
  const head = 8 + 25;
  const parts = [bytes.slice(0, head), ...Object.entries(texts).map(([k, v]) => textChunk(k, v)), bytes.slice(head)];
  return new Blob(parts, { type: 'image/png' });
}
