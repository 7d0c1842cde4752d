// Runs the one-file page in Debian's Firefox (firefox-esr) through WebDriver BiDi, the W3C protocol
// Firefox speaks natively: opens the page from file://, gives it a data file and boundary files, runs
// the default model and prints one JSON line — the result workbook's bytes (base64), the run's message,
// and the console's error lines. Needs Node's WebSocket (node --experimental-websocket on Node 20).
//   node --experimental-websocket firefox-page-run.mjs PAGE.html ID Y X1,X2 DATA BOUNDARY...
import { spawn } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

const [page, id, y, xs, data, ...boundary] = process.argv.slice(2);
const profile = mkdtempSync(join(tmpdir(), 'spillway-firefox-'));
const firefox = spawn('/usr/bin/firefox-esr', ['--headless', '--no-remote', '--profile', profile, '--remote-debugging-port=0', 'about:blank'], { stdio: ['ignore', 'ignore', 'pipe'] });
const finish = (code) => { firefox.kill(); rmSync(profile, { recursive: true, force: true }); process.exit(code); };
setTimeout(() => { console.error('Firefox run timed out'); finish(1); }, 150_000).unref();

try {
  const url = await new Promise((resolve, reject) => {
    let text = '';
    firefox.stderr.on('data', (d) => { text += d; const m = /WebDriver BiDi listening on (ws:\/\/\S+)/.exec(text); if (m) resolve(m[1]); });
    firefox.on('exit', () => reject(new Error(`Firefox ended: ${text.slice(0, 400)}`)));
  });
  const ws = new WebSocket(`${url}/session`);
  await new Promise((resolve, reject) => { ws.addEventListener('open', resolve); ws.addEventListener('error', reject); });
  let next = 1;
  const pending = new Map();
  const errors = [];
  ws.addEventListener('message', (e) => {
    const m = JSON.parse(e.data);
    if (m.id && pending.has(m.id)) { pending.get(m.id)(m); pending.delete(m.id); }
    else if (m.method === 'log.entryAdded' && m.params.level === 'error') errors.push(m.params.text);
  });
  const send = (method, params) => new Promise((resolve, reject) => {
    const id = next++;
    pending.set(id, (m) => (m.type === 'error' ? reject(new Error(`${method}: ${m.error}: ${m.message}`)) : resolve(m.result)));
    ws.send(JSON.stringify({ id, method, params }));
  });
  await send('session.new', { capabilities: {} });
  await send('session.subscribe', { events: ['log.entryAdded'] });
  const { contexts } = await send('browsingContext.getTree', {});
  const context = contexts[0].context;
  await send('browsingContext.navigate', { context, url: `file://${page}`, wait: 'complete' });
  const evaluate = async (expression) => {
    const r = await send('script.evaluate', { expression, target: { context }, awaitPromise: true, resultOwnership: 'root' });
    if (r.type === 'exception') throw new Error(r.exceptionDetails.text);
    return r.result;
  };
  const until = async (expression, ms = 60_000) => {
    const start = Date.now();
    while (Date.now() - start < ms) {
      if ((await evaluate(expression)).value === true) return;
      await new Promise((r) => setTimeout(r, 200));
    }
    throw new Error(`waited in vain for ${expression}`);
  };
  const setFiles = async (selector, files) => {
    const element = await evaluate(`document.querySelector(${JSON.stringify(selector)})`);
    await send('input.setFiles', { context, element: { sharedId: element.sharedId }, files });
  };
  // the page saves its results through blob: URLs; keep the blobs to hand them back
  await evaluate('{ window.__blobs = []; const made = URL.createObjectURL; URL.createObjectURL = (b) => { window.__blobs.push(b); return made.call(URL, b); }; true }');
  await setFiles('#data-file', [data]);
  await until(`document.querySelector('#id-column') !== null && document.querySelector('#y-column') !== null`);
  await evaluate(`{ const s = document.querySelector('#id-column'); s.value = ${JSON.stringify(id)}; s.dispatchEvent(new Event('change', { bubbles: true })); true }`);
  await setFiles('#boundary-file', boundary);
  await until(`/ matched to rows by /.test(document.body.innerText)`);
  await evaluate(`{ const s = document.querySelector('#y-column'); s.value = ${JSON.stringify(y)}; s.dispatchEvent(new Event('change', { bubbles: true }));
    for (const x of ${JSON.stringify(xs.split(','))}) document.querySelector('#x-' + x).click(); document.querySelector('#run').click(); true }`);
  await until(`window.__blobs.some((b) => /spreadsheet/.test(b.type))`, 120_000);
  const workbook = await evaluate(`(async () => { const b = window.__blobs.find((x) => /spreadsheet/.test(x.type)); const bytes = new Uint8Array(await b.arrayBuffer());
    let s = ''; for (let i = 0; i < bytes.length; i += 0x8000) s += String.fromCharCode(...bytes.subarray(i, i + 0x8000)); return btoa(s); })()`);
  const message = await evaluate(`document.querySelector('fluent-message-bar[intent="success"]')?.innerText ?? ''`);
  ws.close();
  // exit only once the (large) line has reached the pipe
  process.stdout.write(JSON.stringify({ workbook: workbook.value, message: message.value, errors }) + '\n', () => finish(0));
} catch (e) {
  console.error(e instanceof Error ? e.message : String(e));
  finish(1);
}
