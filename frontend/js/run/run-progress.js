// Follows a queued or running run by polling its status, and reloads the page when it ends (the server
// then shows the explorer, or what happened).
import { getJson } from '../api.js';
import { count } from '../numbers.js';

const box = document.getElementById('run-progress');
const api = `/api/analyses/${encodeURIComponent(box.dataset.analysis)}/runs/${encodeURIComponent(box.dataset.run)}`;
const ENDED = new Set(['finished', 'failed', 'cancelled', 'interrupted']);

function duration(seconds) {
  if (seconds === null || seconds === undefined || !Number.isFinite(seconds)) return 'unknown';
  if (seconds < 60) return `${seconds.toFixed(1)} s`;
  const m = Math.floor(seconds / 60);
  return `${m} min ${Math.round(seconds - m * 60)} s`;
}

function show(s) {
  const stateNode = document.getElementById('run-state');
  stateNode.textContent = s.state;
  stateNode.className = `state state-${s.state}`;
  const position = document.getElementById('queue-position');
  if (position) position.textContent = s.queuePosition > 0 ? `(number ${s.queuePosition} in the queue)` : '';
  const bar = document.getElementById('run-bar');
  bar.max = Math.max(1, s.total);
  bar.value = s.done;
  document.getElementById('run-done').textContent = count(s.done);
  document.getElementById('run-total').textContent = count(s.total);
  document.getElementById('run-elapsed').textContent = duration(s.elapsedSeconds);
  const draws = document.getElementById('run-draws');
  if (s.phase === 'null draws') {
    draws.hidden = false;
    draws.textContent = `Null draws: ${count(s.drawsDone)} of ${count(s.drawsTotal)}`;
  }
  let remaining = '0 s';
  if (s.state === 'queued') remaining = 'waiting to start';
  else if (s.state === 'running' && s.phase === 'fitting') remaining = duration(s.remainingSeconds);
  else if (s.state === 'running') remaining = 'null draws under way';
  document.getElementById('run-remaining').textContent = remaining;
}

async function poll() {
  try {
    const s = await getJson(api);
    show(s);
    if (ENDED.has(s.state)) {
      if (box.dataset.state !== s.state) location.reload();
      return;
    }
  } catch (e) {
    document.getElementById('run-remaining').textContent = `unknown (${e.message})`;
  }
  setTimeout(poll, 400);
}

if (!ENDED.has(box.dataset.state)) poll();
