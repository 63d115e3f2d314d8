// Follows a queued or running run by polling its status: each phase (fitting, inference, writing files)
// with its own progress, and reloads the page when the run ends (the server then shows the explorer, or
// what happened, without any progress).
import { getJson } from '../api.js';
import { count } from '../numbers.js';

const box = document.getElementById('run-progress');
const api = `/api/analyses/${encodeURIComponent(box.dataset.analysis)}/runs/${encodeURIComponent(box.dataset.run)}`;
const ENDED = new Set(['finished', 'failed', 'cancelled', 'interrupted']);
const PHASES = ['fitting', 'inference', 'writing files'];

function duration(seconds) {
  if (seconds === null || seconds === undefined || !Number.isFinite(seconds)) return 'unknown';
  if (seconds < 60) return `${seconds.toFixed(1)} s`;
  const m = Math.floor(seconds / 60);
  return `${m} min ${Math.round(seconds - m * 60)} s`;
}

/** Sets a bar to done of total, or to "under way" (no value: the browser's indeterminate bar) without a total. */
function fill(bar, done, total) {
  if (total > 0) {
    bar.max = total;
    bar.value = done;
  } else {
    bar.removeAttribute('value');
  }
}

function complete(bar) {
  bar.max = 1;
  bar.value = 1;
}

/** Marks each phase as done, current or still to come, from the run's current phase. */
function mark(s) {
  const current = s.state === 'running' ? PHASES.indexOf(s.phase) : -1;
  for (const [k, id] of ['phase-fitting', 'phase-inference', 'phase-writing'].entries()) {
    const item = document.getElementById(id);
    item.classList.toggle('phase-done', current > k);
    item.classList.toggle('phase-current', current === k);
    if (current === k) item.setAttribute('aria-current', 'step');
    else item.removeAttribute('aria-current');
  }
  return current;
}

function showInference(s, current) {
  const bar = document.getElementById('inference-bar');
  const text = document.getElementById('inference-text');
  if (current < 1) return;
  if (current > 1) {
    complete(bar);
    text.textContent = s.drawsTotal > 0 ? `${count(s.drawsTotal)} null draws made, summaries computed` : 'summaries computed';
  } else if (s.phaseTotal > 0 && s.phaseDone < s.phaseTotal) {
    fill(bar, s.phaseDone, s.phaseTotal);
    text.textContent = `${count(s.phaseDone)} of ${count(s.phaseTotal)} null draws`;
  } else if (s.phaseTotal > 0) {
    fill(bar, 0, 0);
    text.textContent = `${count(s.phaseTotal)} null draws made; computing the summaries (bounds, weights, influence)`;
  } else {
    fill(bar, 0, 0);
    text.textContent = 'computing the summaries (bounds, weights, influence)';
  }
}

function showWriting(s, current) {
  if (current !== 2) return;
  const text = document.getElementById('writing-text');
  fill(document.getElementById('writing-bar'), s.phaseDone, s.phaseTotal);
  text.textContent = s.phaseTotal > 0
    ? `${count(s.phaseDone)} of ${count(s.phaseTotal)} rows of specifications.csv written`
    : 'writing specifications.csv';
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
  const current = mark(s);
  showInference(s, current);
  showWriting(s, current);
  document.getElementById('run-remaining').textContent =
    s.state === 'queued' ? 'waiting to start' : duration(s.remainingSeconds);
}

async function poll() {
  try {
    const s = await getJson(api);
    if (ENDED.has(s.state)) {
      // the page for an ended run has no progress: never show a bar or a cancel button beside an end
      box.hidden = true;
      location.reload();
      return;
    }
    show(s);
  } catch (e) {
    document.getElementById('run-remaining').textContent = `unknown (${e.message})`;
  }
  setTimeout(poll, 400);
}

if (!ENDED.has(box.dataset.state)) poll();
