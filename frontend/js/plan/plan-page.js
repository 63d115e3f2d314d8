// The plan page: loads the plan and the data's columns, draws the form, keeps the specification count and
// the server's check up to date as the plan is edited, and saves, runs, imports and exports it.
import { ApiError, getJson, sendJson } from '../api.js';
import { debounce, download, el } from '../helpers.js';
import { clearProblems, renderPlan, showProblem } from './plan-form.js';
import { specificationCount } from './plan-model.js';

const root = document.getElementById('plan-editor');
const analysis = root.dataset.analysis;
const api = `/api/analyses/${encodeURIComponent(analysis)}`;
const jsonBox = document.getElementById('plan-json');

let plan = null;
let columns = [];

const countNode = el('span', { class: 'count', id: 'spec-count', 'aria-live': 'polite' });
const statusNode = el('p', { class: 'plan-status', id: 'plan-status', role: 'status' });
const noticeNode = el('p', { class: 'plan-status', id: 'plan-notice', role: 'status' });
const saveButton = el('button', { type: 'button', id: 'save-plan' }, 'Save the plan');
const runButton = el('button', { type: 'button', class: 'primary', id: 'run-plan' }, 'Save and run');
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

const check = debounce(async () => {
  const sent = text();
  let answer;
  try {
    answer = await sendJson('POST', `${api}/plan/check`, sent);
  } catch (e) {
    statusNode.textContent = `The plan could not be checked: ${e.message}`;
    return;
  }
  if (sent !== text()) return;
  clearProblems(root);
  if (answer.valid) {
    statusNode.textContent = 'The plan is ready to run on this data.';
  } else {
    statusNode.textContent = `Not ready: ${answer.where ? `${answer.where}: ` : ''}${answer.message}`;
    showProblem(root, answer.where, answer.message);
  }
}, 300);

function changed() {
  jsonBox.value = text();
  showCount();
  check();
}

function restructured() {
  const focused = document.activeElement && document.activeElement.closest('[data-path]');
  const path = focused ? focused.getAttribute('data-path') : null;
  renderPlan(root, plan, columns, { changed, restructured });
  if (path !== null) {
    const again = [...root.querySelectorAll('[data-path]')].find((n) => n.getAttribute('data-path') === path);
    const control = again && again.querySelector('input, select, textarea, button');
    if (control) control.focus();
  }
  changed();
}

async function save() {
  clearProblems(root);
  try {
    await sendJson('PUT', `${api}/plan`, text());
    statusNode.textContent = 'Saved. The plan is ready to run on this data.';
    return true;
  } catch (e) {
    if (e instanceof ApiError) {
      statusNode.textContent = `Not saved: ${e.where ? `${e.where}: ` : ''}${e.message}`;
      const field = showProblem(root, e.where, e.message);
      if (field) field.scrollIntoView({ block: 'center' });
    } else {
      statusNode.textContent = `Not saved: ${e.message}`;
    }
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

function adopt(parsed, source) {
  if (parsed === null || typeof parsed !== 'object' || Array.isArray(parsed)) {
    noticeNode.textContent = `${source} is not a plan: a plan is a JSON object with "data" and "decisions".`;
    return;
  }
  let note = '';
  if (parsed.data !== 'data.csv') {
    note = ` The plan named the data file "${parsed.data ?? ''}"; here it uses this analysis's data, data.csv.`;
    parsed.data = 'data.csv';
  }
  plan = parsed;
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
  saveButton.addEventListener('click', save);
  runButton.addEventListener('click', saveAndRun);
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
    countNode, saveButton, runButton, exportButton, importLabel, importInput, statusNode, noticeNode);
  root.after(bar);
  const plainRun = document.getElementById('run-saved-form');
  if (plainRun) plainRun.hidden = true;
}

async function start() {
  try {
    const [data, current] = await Promise.all([getJson(api), getJson(`${api}/plan`)]);
    columns = data.columns.map((c) => ({ name: c.name, type: c.type }));
    plan = current.plan;
  } catch (e) {
    root.textContent = `The plan could not be loaded: ${e.message}`;
    return;
  }
  toolbar();
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
