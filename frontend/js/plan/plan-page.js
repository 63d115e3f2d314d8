// The plan page: loads the plan and the data's columns, draws the form, keeps the specification count and
// the server's check up to date as the plan is edited, and saves, runs, imports and exports it.
import { ApiError, getJson, post, sendJson } from '../api.js';
import { refreshHistory } from './plan-history.js';
import { debounce, download, el } from '../helpers.js';
import { clearProblems, refreshCounts, renderPlan, showProblems } from './plan-form.js';
import { problemInWords, specificationCount } from './plan-model.js';

const root = document.getElementById('plan-editor');
const analysis = root.dataset.analysis;
/** The analysis's data as its plans name it: data.csv, or data.parquet for a Parquet upload. */
const dataFile = root.dataset.dataFile || 'data.csv';
const api = `/api/analyses/${encodeURIComponent(analysis)}`;
const jsonBox = document.getElementById('plan-json');

let plan = null;
let columns = [];
let defaults = null;
// which problems are shown: those at fields the user has touched or filled, or all once asked for
const shown = { touched: new Set(), all: false };
let lastProblems = [];
/** Milliseconds of quiet after an edit before the server checks the plan. */
const CHECK_DELAY = 400;

const countNode = el('span', { class: 'count', id: 'spec-count', 'aria-live': 'polite' });
const statusNode = el('p', { class: 'plan-status', id: 'plan-status', role: 'status' });
const noticeNode = el('p', { class: 'plan-status', id: 'plan-notice', role: 'status' });
const checkButton = el('button', { type: 'button', id: 'check-plan' }, 'Check the plan');
const estimateButton = el('button', { type: 'button', id: 'estimate-plan',
  title: 'Fits a few of the specifications on this server and says how long the whole run would take' },
'How long would it take?');
const estimateNode = el('p', { class: 'plan-status', id: 'plan-estimate', role: 'status' });
const saveButton = el('button', { type: 'button', id: 'save-plan' }, 'Save the plan');
const runButton = el('button', { type: 'button', class: 'primary', id: 'run-plan' }, 'Save and run');
const lockButton = el('button', { type: 'button', id: 'lock-plan',
  title: 'Saves the plan and records its SHA-256 and the data\u2019s, with the time and a fingerprint to deposit before any result is seen' },
'Lock this plan');
const lockNode = el('p', { class: 'plan-status', id: 'plan-lock', role: 'status' });
const exportButton = el('button', { type: 'button', id: 'export-plan' }, 'Export plan.json');
const importInput = el('input', { type: 'file', id: 'import-plan', accept: '.json,application/json' });
const applyJson = el('button', { type: 'button', id: 'apply-json' }, 'Use this JSON in the form');

function text() {
  return JSON.stringify(plan, null, 2);
}

function showCount() {
  const n = specificationCount(plan);
  const sample = Number(plan.sample || 0);
  let words = `${n.toLocaleString('en')} specification${n === 1n ? '' : 's'}`;
  if (sample > 0 && BigInt(Math.floor(sample)) < n) words += `; a seeded random sample of ${sample.toLocaleString('en')} is fitted`;
  countNode.textContent = words;
}

/** Shows the last check's problems as `shown` allows, and says in the status line how many there are. */
function display() {
  const { shown: notes, held } = showProblems(root, lastProblems, plan, shown);
  if (lastProblems.length === 0) return notes;
  const n = notes.length;
  const parts = [];
  if (n > 0) parts.push(`${n} problem${n === 1 ? '' : 's'}, each shown at its field`);
  if (held > 0) parts.push(`${held} more at fields not filled in yet (\u201cCheck the plan\u201d shows ${held === 1 ? 'it' : 'them'})`);
  statusNode.textContent = `Not ready: ${parts.join('; ')}.`;
  return notes;
}

// Each check is numbered, so that the answer of one sent before a later check (the typing pause's, overtaken
// by a save's) cannot overwrite what the later one, or the save after it, said.
let lastCheck = 0;

async function runCheck() {
  const sent = text();
  const number = ++lastCheck;
  let answer;
  try {
    answer = await sendJson('POST', `${api}/plan/check`, sent);
  } catch (e) {
    statusNode.textContent = `The plan could not be checked: ${e.message}`;
    return null;
  }
  if (sent !== text() || number !== lastCheck) return null;
  lastProblems = answer.valid ? [] : answer.problems;
  if (answer.valid) {
    clearProblems(root);
    statusNode.textContent = 'The plan is ready to run on this data.';
    return [];
  }
  return display();
}

// the server reads the whole plan against the data: ask once typing pauses, not at every key
const check = debounce(runCheck, CHECK_DELAY);

/** Asks the server to time a few specifications of the plan as it stands and says what the run would take. */
async function estimate() {
  estimateNode.textContent = 'Timing a few specifications on this server\u2026';
  const sent = text();
  try {
    const answer = await sendJson('POST', `${api}/plan/estimate`, sent);
    if (sent !== text()) {
      estimateNode.textContent = 'The plan changed while it was timed; ask again.';
      return;
    }
    estimateNode.textContent = `Time: ${answer.time}. Memory: ${answer.memory}.`;
  } catch (e) {
    estimateNode.textContent = `No estimate: ${e.message}`;
  }
}

/** Asks for every problem at once and brings the first into view. */
async function checkAll() {
  shown.all = true;
  const notes = await runCheck();
  if (notes && notes.length > 0) notes[0].closest('[data-path]').scrollIntoView({ block: 'center' });
}

function changed(path) {
  if (path !== undefined) shown.touched.add(path);
  jsonBox.value = text();
  showCount();
  refreshCounts(root, plan);
  check();
}

function restructured(path) {
  if (path !== undefined) shown.touched.add(path);
  const focused = document.activeElement && document.activeElement.closest('[data-path]');
  const focusPath = focused ? focused.getAttribute('data-path') : null;
  renderPlan(root, plan, columns, defaults, { changed, restructured });
  if (focusPath !== null) {
    const again = [...root.querySelectorAll('[data-path]')].find((n) => n.getAttribute('data-path') === focusPath);
    const control = again && again.querySelector('input, select, textarea, button');
    if (control) control.focus();
  }
  changed();
}

async function save() {
  // the check lists every problem, where a refused save answers with its first: check first, in place of
  // the typing pause's check still waiting
  check.cancel();
  shown.all = true;
  const notes = await runCheck();
  if (notes && notes.length > 0) {
    statusNode.textContent = `Not saved. ${statusNode.textContent}`;
    notes[0].closest('[data-path]').scrollIntoView({ block: 'center' });
    return false;
  }
  try {
    await sendJson('PUT', `${api}/plan`, text());
    lastProblems = [];
    clearProblems(root);
    statusNode.textContent = 'Saved. The plan is ready to run on this data.';
    refreshHistory(analysis).catch((e) => {
      statusNode.textContent += ` (The list of saved versions could not be drawn again: ${e.message}; reload the page.)`;
    });
    return true;
  } catch (e) {
    const words = e instanceof ApiError ? problemInWords(e.where, e.message, plan) : e.message;
    statusNode.textContent = `Not saved: ${words}`;
    return false;
  }
}

async function saveAndRun() {
  runButton.disabled = true;
  try {
    if (!(await save())) return;
    const status = await sendJson('POST', `${api}/runs`, '');
    location.assign(`/analyses/${encodeURIComponent(analysis)}/runs/${encodeURIComponent(status.id)}`);
  } catch (e) {
    statusNode.textContent = `The run could not start: ${e.message}`;
  } finally {
    runButton.disabled = false;
  }
}

/** The saved plan's lock as the server last answered, or null when it is not locked. */
let currentLock = null;

/** Says whether the saved plan is locked, when, with which fingerprint, and whether it still matches. */
function showLock(lock) {
  currentLock = lock;
  if (!lock) {
    lockNode.textContent = 'Not locked. Decide the set of specifications before seeing any result, then lock the plan.';
    return;
  }
  const changed = [lock.plan_matches ? null : 'the saved plan', lock.data_matches ? null : 'the data'].filter(Boolean);
  lockNode.textContent = `Locked at ${lock.locked}, fingerprint ${lock.fingerprint}. `
    + (changed.length === 0 ? 'The saved plan and the data match the lock; runs record it.'
      : `${changed.join(' and ')} changed after the lock: runs will say so.`);
}

async function lockPlan() {
  lockButton.disabled = true;
  try {
    if (currentLock && !window.confirm(`The plan was locked at ${currentLock.locked} (fingerprint `
      + `${currentLock.fingerprint}). Lock it anew, with a new time and fingerprint?`)) return;
    if (!(await save())) return;
    const answer = await post(`${api}/plan/lock${currentLock ? '?replace=yes' : ''}`);
    showLock(answer.lock);
  } catch (e) {
    lockNode.textContent = `Not locked: ${e.message}`;
  } finally {
    lockButton.disabled = false;
  }
}

function adopt(parsed, source) {
  if (parsed === null || typeof parsed !== 'object' || Array.isArray(parsed)) {
    noticeNode.textContent = `${source} is not a plan: a plan is a JSON object with "data" and "decisions".`;
    return;
  }
  let note = '';
  if (parsed.data !== dataFile) {
    note = ` The plan named the data file "${parsed.data ?? ''}"; here it uses this analysis's data, ${dataFile}.`;
    parsed.data = dataFile;
  }
  plan = parsed;
  shown.touched.clear();
  shown.all = true;
  restructured();
  noticeNode.textContent = `${source} is now the plan being edited (not saved yet).${note}`;
}

function toolbar() {
  const importLabel = el('label', { for: 'import-plan', class: 'button' }, 'Import a plan file');
  importInput.classList.add('visually-hidden');
  importInput.addEventListener('change', async () => {
    const file = importInput.files[0];
    if (!file) return;
    const content = await file.text();
    try {
      adopt(JSON.parse(content), file.name);
    } catch (e) {
      noticeNode.textContent = `${file.name} is not valid JSON: ${e.message}`;
    }
    importInput.value = '';
  });
  checkButton.addEventListener('click', checkAll);
  estimateButton.addEventListener('click', estimate);
  saveButton.addEventListener('click', save);
  runButton.addEventListener('click', saveAndRun);
  lockButton.addEventListener('click', lockPlan);
  exportButton.addEventListener('click', () => download(new Blob([`${text()}\n`], { type: 'application/json' }), 'plan.json'));
  applyJson.addEventListener('click', () => {
    try {
      adopt(JSON.parse(jsonBox.value), 'The JSON text');
    } catch (e) {
      noticeNode.textContent = `The JSON text is not valid JSON: ${e.message}`;
    }
  });
  document.getElementById('save-json').after(' ', applyJson);
  const bar = el('div', { class: 'plan-toolbar', role: 'region', 'aria-label': 'Plan actions' },
    countNode, checkButton, estimateButton, saveButton, runButton, lockButton, exportButton, importLabel, importInput, statusNode, noticeNode, estimateNode, lockNode);
  root.after(bar);
  const plainRun = document.getElementById('run-saved-form');
  if (plainRun) plainRun.hidden = true;
}

async function start() {
  try {
    const [data, current] = await Promise.all([getJson(api), getJson(`${api}/plan`)]);
    columns = data.columns.map((c) => ({ name: c.name, type: c.type }));
    plan = current.plan;
    defaults = current.defaults;
    // a saved plan was whole when it was saved: what the data now say about it is shown at once
    shown.all = current.saved;
  } catch (e) {
    root.textContent = `The plan could not be loaded: ${e.message}`;
    return;
  }
  toolbar();
  getJson(`${api}/plan/lock`).then((answer) => showLock(answer.lock),
    (e) => { lockNode.textContent = `Whether the plan is locked is not known: ${e.message}`; });
  // the live check below the form takes over from the problem the server printed for the JSON text
  const panel = document.getElementById('plan-json-panel');
  panel.querySelectorAll('.has-problem').forEach((n) => n.classList.remove('has-problem'));
  const printed = document.getElementById('plan-json-problem');
  if (printed) printed.remove();
  jsonBox.removeAttribute('aria-describedby');
  panel.open = false;
  restructured();
}

start();
