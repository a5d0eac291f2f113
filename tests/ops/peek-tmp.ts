import { editorSession } from './session';
const base = 'http://127.0.0.1:4101';
const s = await editorSession(base);
const list = await (await fetch(base + '/api/sheets?pageSize=50', { headers: s.headers })).json() as { items: { id: string; title: string }[] };
for (const item of list.items.slice(0, 6)) {
  const times: number[] = [];
  let size = 0;
  for (let k = 0; k < 5; k++) {
    const t0 = performance.now();
    const r = await fetch(`${base}/sheets/${item.id}`, { headers: { cookie: s.headers.cookie } });
    const text = await r.text();
    size = text.length;
    times.push(performance.now() - t0);
  }
  times.sort((a, b) => a - b);
  console.log(item.title.padEnd(50), 'median', times[2].toFixed(0), 'ms  min', times[0].toFixed(0), ' bytes', size);
}
