import { performance } from 'node:perf_hooks';
const seg = new Intl.Segmenter('und', { granularity: 'word' });
const text = 'unlock app helmet bike ride quite bit again today ヘルメットが大きすぎる';
let t = performance.now();
for (let i = 0; i < 1000; i++) { const o = []; for (const s of seg.segment(text)) if (s.isWordLike) o.push(s.segment); }
console.log('segment', performance.now() - t);
t = performance.now();
for (let i = 0; i < 1000; i++) { text.normalize('NFC').toLowerCase().replace(/(\p{L})['’](?=\p{L})/gu, '$1'); }
console.log('normalize', performance.now() - t);
t = performance.now();
for (let i = 0; i < 1000; i++) { text.match(/\p{L}[\p{L}\p{M}]*/gu); }
console.log('regex', performance.now() - t);
