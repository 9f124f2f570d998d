// A minimal reader for the .vsix (a zip): the central directory's names and each entry's
// bytes (stored or deflated). Layout from PKWARE's APPNOTE.TXT, sections 4.3.7, 4.3.12, 4.3.16.
"use strict";
const zlib = require("node:zlib");

function readZip(buffer) {
  // End of central directory: signature 0x06054b50, searched from the end (comment ≤ 64 KiB).
  let end = -1;
  for (let i = buffer.length - 22; i >= Math.max(0, buffer.length - 22 - 0xffff); i--) {
    if (buffer.readUInt32LE(i) === 0x06054b50) {
      end = i;
      break;
    }
  }
  if (end < 0) {
    throw new Error("not a zip: no end of central directory");
  }
  const count = buffer.readUInt16LE(end + 10);
  let at = buffer.readUInt32LE(end + 16);
  const entries = new Map();
  for (let n = 0; n < count; n++) {
    if (buffer.readUInt32LE(at) !== 0x02014b50) {
      throw new Error(`bad central directory entry ${n}`);
    }
    const method = buffer.readUInt16LE(at + 10);
    const compressed = buffer.readUInt32LE(at + 20);
    const nameLength = buffer.readUInt16LE(at + 28);
    const extraLength = buffer.readUInt16LE(at + 30);
    const commentLength = buffer.readUInt16LE(at + 32);
    const local = buffer.readUInt32LE(at + 42);
    const name = buffer.toString("utf8", at + 46, at + 46 + nameLength);
    entries.set(name, { method, compressed, local });
    at += 46 + nameLength + extraLength + commentLength;
  }
  function read(name) {
    const e = entries.get(name);
    if (!e) {
      throw new Error(`${name} is not in the archive`);
    }
    const start = e.local + 30 + buffer.readUInt16LE(e.local + 26) + buffer.readUInt16LE(e.local + 28);
    const data = buffer.subarray(start, start + e.compressed);
    if (e.method === 0) {
      return data;
    }
    if (e.method === 8) {
      return zlib.inflateRawSync(data);
    }
    throw new Error(`${name}: compression method ${e.method}`);
  }
  return { names: [...entries.keys()], read };
}

module.exports = { readZip };
