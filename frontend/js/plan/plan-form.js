// Draws the plan form from the plan JSON and writes every edit back into it. Every field carries the JSON
// path the plan reader uses in its messages (data-path), so a problem is shown beside the field it names.
// A change of value (typing, ticking a control) updates the plan and the few counts it changes in place;
// only a change of structure (a decision or alternative added, removed or moved, a rule or kind changed)
// draws the form again.
import { clear, el } from '../helpers.js';
import { count as countText } from '../numbers.js';
import {
  ABSORB_HELP, ERROR_HELP, ERROR_TYPES, KINDS, KIND_TITLES, MISSING_HELP, MODELS, NULL_METHOD_HELP, TRANSFORMS,
  WEIGHTS_HELP, alternativeCount,
  newAlternative, newDecision, parentPath, parseTransform, problemInWords,
} from './plan-model.js';

let sequence = 0;

function idFor(path) {
  sequence += 1;
  return `f-${path.replace(/[^A-Za-z0-9]+/g, '-')}-${sequence}`;
}

/**
 * @param root     the element to draw into (emptied first)
 * @param plan     the plan object, edited in place
 * @param columns  the data's columns, [{name, type}]
 * @param defaults the value the plan reader takes for each top-level setting left out
 * @param hooks    {changed(path): a value changed at that path, restructured(path): redraw needed}
 */
export function renderPlan(root, plan, columns, defaults, hooks) {
  sequence = 0;
  clear(root);
  const f = new Fields(columns, hooks);
  root.append(
    el('section', { class: 'panel', 'aria-labelledby': 'about-title' },
      el('h2', { id: 'about-title' }, 'About this plan'),
      el('div', { class: 'field', 'data-path': '' }, el('p', { class: 'problem', hidden: true, role: 'alert' })),
      f.text('title', 'Title', plan.title || '', (v) => set(plan, 'title', v), { class: 'wide' }),
      f.area('description', 'Description (the reasoning behind the decisions, for the record)',
        plan.description || '', (v) => set(plan, 'description', v)),
      el('p', { class: 'hint' }, `Data: this analysis\u2019s file (${plan.data || 'data.csv'}).`)));
  const list = el('div', { class: 'decisions', 'data-path': 'decisions' },
    el('h2', {}, 'Decisions'), el('p', { class: 'problem', hidden: true, role: 'alert' }));
  (plan.decisions || []).forEach((d, i) => list.append(decision(f, plan, d, i)));
  list.append(addDecision(plan, hooks));
  root.append(list, settings(f, plan, defaults));
}

/** Writes the alternative count of every decision again (after a tick, which does not redraw the form). */
export function refreshCounts(root, plan) {
  (plan.decisions || []).forEach((d, i) => {
    const node = root.querySelector(`[data-path="decisions[${i}]"] .alternative-count`);
    if (node) node.textContent = alternativesText(alternativeCount(d));
  });
}

function alternativesText(n) {
  return `${n.toLocaleString('en')} alternative${n === 1n ? '' : 's'}`;
}

function set(object, key, value) {
  if (value === '' || value === null || value === undefined || (typeof value === 'number' && Number.isNaN(value))) {
    delete object[key];
  } else {
    object[key] = value;
  }
}

class Fields {
  constructor(columns, hooks) {
    this.columns = columns;
    this.hooks = hooks;
  }

  wrap(path, label, control, extra = null) {
    const id = control.id;
    return el('div', { class: 'field', 'data-path': path }, el('label', { for: id }, label), control, extra,
      el('p', { class: 'problem', hidden: true, role: 'alert' }));
  }

  text(path, label, value, write, attributes = {}) {
    const input = el('input', { type: 'text', id: idFor(path), ...attributes });
    input.value = value;
    input.addEventListener('input', () => {
      write(input.value);
      this.hooks.changed(path);
    });
    return this.wrap(path, label, input);
  }

  area(path, label, value, write) {
    const input = el('textarea', { id: idFor(path), rows: 2 });
    input.value = value;
    input.addEventListener('input', () => {
      write(input.value);
      this.hooks.changed(path);
    });
    return this.wrap(path, label, input);
  }

  /** A number; when it may be left out, `fallback` is what the plan reader then takes, shown as the hint. */
  number(path, label, value, write, attributes = {}, fallback = null) {
    const input = el('input', { type: 'number', id: idFor(path), ...attributes });
    input.value = value === undefined || value === null ? '' : String(value);
    input.addEventListener('input', () => {
      write(input.value === '' ? '' : Number(input.value));
      this.hooks.changed(path);
    });
    if (fallback === null) return this.wrap(path, label, input);
    input.placeholder = fallback.value;
    const hint = el('p', { class: 'hint default-hint', id: `${input.id}-default` }, `Left empty: ${fallback.words}`);
    input.setAttribute('aria-describedby', hint.id);
    return this.wrap(path, label, input, hint);
  }

  select(path, label, options, value, write, restructure = false) {
    const select = el('select', { id: idFor(path) });
    for (const o of options) select.append(el('option', { value: o.value }, o.text));
    select.value = value;
    select.addEventListener('change', () => {
      write(select.value);
      if (restructure) this.hooks.restructured(path);
      else this.hooks.changed(path);
    });
    return this.wrap(path, label, select);
  }

  /**
   * A select with a line beside it on what the chosen value means and its source (`help` maps each value
   * to {text, source}); the line follows the choice without a redraw.
   */
  explained(path, label, options, value, help, write, restructure = false) {
    const field = this.select(path, label, options, value, write, restructure);
    const control = field.querySelector('select');
    const note = el('p', { class: 'hint choice-note', id: `${control.id}-note` });
    const explain = () => {
      const h = help[control.value];
      clear(note);
      if (h) note.append(h.text, ' ', el('span', { class: 'source' }, `Source: ${h.source}.`));
    };
    explain();
    control.addEventListener('change', explain);
    control.setAttribute('aria-describedby', note.id);
    field.insertBefore(note, field.querySelector('.problem'));
    return field;
  }

  column(path, label, value, write, none = null, restructure = false) {
    const options = none ? [{ value: '', text: none }] : [{ value: '', text: 'choose a column' }];
    for (const c of this.columns) options.push({ value: c.name, text: `${c.name} (${c.type})` });
    if (value && !this.columns.some((c) => c.name === value)) options.push({ value, text: `${value} (not in the data)` });
    return this.select(path, label, options, value || '', write, restructure);
  }

  /**
   * A ticked list of columns, kept in the order they were ticked (the plan's order). A tick changes the
   * plan and the legend (`legend` is its text for the list as it stands), nothing else of the form.
   */
  columnList(path, legend, chosen, write) {
    const title = el('legend', {}, legend(chosen));
    const set = el('fieldset', { class: 'column-choices' }, title);
    for (const c of this.columns) {
      const id = idFor(`${path}-${c.name}`);
      const box = el('input', { type: 'checkbox', id, value: c.name });
      box.checked = chosen.includes(c.name);
      box.addEventListener('change', () => {
        const now = chosen.filter((n) => n !== c.name);
        if (box.checked) now.push(c.name);
        chosen.splice(0, chosen.length, ...now);
        write(chosen);
        title.textContent = legend(chosen);
        this.hooks.changed(path);
      });
      set.append(el('div', {}, box, ' ', el('label', { for: id }, c.name)));
    }
    return el('div', { class: 'field', 'data-path': path }, set, el('p', { class: 'problem', hidden: true, role: 'alert' }));
  }
}

function decision(f, plan, d, i) {
  const path = `decisions[${i}]`;
  const box = el('section', { class: 'decision', 'data-path': path, 'aria-label': `Decision ${i + 1}: ${d.name || d.kind}` });
  const n = alternativeCount(d);
  const head = el('div', { class: 'decision-head' },
    el('div', {}, el('div', { class: 'kind' }, d.kind || 'decision'), el('div', {}, KIND_TITLES[d.kind] || '')),
    f.text(`${path}.name`, 'Decision name', d.name || '', (v) => { d.name = v; }),
    el('span', { class: 'alternative-count' }, alternativesText(n)),
    el('span', { class: 'spacer' }),
    button('Move up', `Move decision ${d.name} up`, i === 0, () => move(plan, i, -1, f.hooks)),
    button('Move down', `Move decision ${d.name} down`, i === plan.decisions.length - 1, () => move(plan, i, 1, f.hooks)),
    button('Remove', `Remove decision ${d.name}`, false, () => {
      plan.decisions.splice(i, 1);
      f.hooks.restructured('decisions');
    }));
  box.append(head, el('p', { class: 'problem', hidden: true, role: 'alert' }));
  if (d.kind === 'controls') {
    box.append(controls(f, d, path));
  } else if (['outcome', 'predictor', 'sample', 'errors', 'absorb', 'model', 'weights'].includes(d.kind)) {
    box.append(alternatives(f, d, path));
  }
  return box;
}

function button(text, label, disabled, action) {
  const b = el('button', { type: 'button', class: 'small', 'aria-label': label, disabled });
  b.textContent = text;
  b.addEventListener('click', action);
  return b;
}

function move(plan, i, by, hooks) {
  const [d] = plan.decisions.splice(i, 1);
  plan.decisions.splice(i + by, 0, d);
  hooks.restructured('decisions');
}

function alternatives(f, d, path) {
  if (!Array.isArray(d.alternatives)) d.alternatives = [];
  const list = el('div', { class: 'alternatives', 'data-path': `${path}.alternatives` },
    el('p', { class: 'problem', hidden: true, role: 'alert' }));
  d.alternatives.forEach((a, j) => {
    const p = `${path}.alternatives[${j}]`;
    const row = el('div', { class: 'alternative', 'data-path': p });
    if (d.kind === 'outcome' || d.kind === 'predictor') variable(f, d, a, p, row);
    else if (d.kind === 'sample') sampleRule(f, a, p, row);
    else if (d.kind === 'errors') errorType(f, d, j, p, row);
    else if (d.kind === 'model') modelChoice(f, d, j, p, row);
    else if (d.kind === 'weights') weightChoice(f, a, p, row);
    else absorbChoice(f, a, p, row);
    row.append(button('Remove', `Remove alternative ${j + 1} of ${d.name}`, false, () => {
      d.alternatives.splice(j, 1);
      f.hooks.restructured(`${path}.alternatives`);
    }), el('p', { class: 'problem', hidden: true, role: 'alert' }));
    list.append(row);
  });
  list.append(el('div', { class: 'add-row' }, button('Add an alternative', `Add an alternative to ${d.name}`, false, () => {
    d.alternatives.push(newAlternative(d.kind, d));
    f.hooks.restructured(`${path}.alternatives`);
  })));
  return list;
}

function variable(f, d, a, p, row) {
  row.append(
    f.text(`${p}.label`, 'Label', a.label || '', (v) => { a.label = v; }),
    f.column(`${p}.column`, 'Column', a.column, (v) => { a.column = v; }));
  const t = parseTransform(a.transform);
  row.append(f.select(`${p}.transform`, 'Transform', TRANSFORMS.map((x) => ({ value: x, text: x })), t.name, (v) => {
    if (v === 'none') delete a.transform;
    else a.transform = v === 'winsorize' ? `winsorize:${t.fraction || '0.05'}` : v;
  }, true));
  if (t.name === 'winsorize') {
    row.append(f.number(`${p}.transform`, 'Winsorize fraction (each tail)', t.fraction, (v) => {
      a.transform = `winsorize:${v === '' ? '' : v}`;
    }, { step: '0.01', min: '0', max: '0.5' }));
  }
}

const RULES = [
  { value: 'all', text: 'all rows' },
  { value: 'keep', text: 'rows where an expression holds' },
  { value: 'trim', text: 'rows within a z-score bound' },
];

function sampleRule(f, a, p, row) {
  const rule = 'keep' in a ? 'keep' : 'trim' in a ? 'trim' : 'all';
  row.append(f.text(`${p}.label`, 'Label', a.label || '', (v) => { a.label = v; }),
    f.select(`${p}.rule`, 'Rule', RULES, rule, (v) => {
      delete a.keep;
      delete a.trim;
      if (v === 'keep') a.keep = '';
      if (v === 'trim') a.trim = { column: '', z: 3 };
    }, true));
  if (rule === 'keep') {
    row.append(f.text(`${p}.keep`, 'Keep rows where (as in: age >= 18 and region != "south")', a.keep || '',
      (v) => { a.keep = v; }, { class: 'expression', size: 44, spellcheck: 'false' }));
  } else if (rule === 'trim') {
    row.append(f.column(`${p}.trim.column`, 'Trim on column', a.trim.column, (v) => { a.trim.column = v; }),
      f.number(`${p}.trim.z`, 'Largest |z| kept', a.trim.z, (v) => { a.trim.z = v; }, { step: '0.1', min: '0' }));
  }
}

function errorType(f, d, j, p, row) {
  const text = String(d.alternatives[j] || '');
  const cluster = text.startsWith('cluster:');
  const kind = cluster ? 'cluster' : text;
  row.append(f.explained(p, 'Type', ERROR_TYPES.map((x) => ({
    value: x, text: x === 'cluster' ? 'cluster-robust (CR1)' : x,
  })), kind, ERROR_HELP, (v) => {
    d.alternatives[j] = v === 'cluster' ? 'cluster:' : v;
  }, true));
  if (cluster) {
    // cluster:a+b is multi-way clustering: one field per column, and one more to add a column
    const names = text.slice('cluster:'.length).split('+').map((n) => n.trim());
    const write = () => { d.alternatives[j] = `cluster:${names.filter((n) => n).join('+')}`; };
    names.forEach((name, c) => {
      row.append(f.column(c === 0 ? `${p}.cluster` : `${p}.cluster-${c + 1}`, c === 0 ? 'Clusters' : 'and',
        name, (v) => { names[c] = v; write(); }, c === 0 ? null : 'no further column', true));
    });
    if (names[0]) {
      row.append(f.column(`${p}.cluster-${names.length + 1}`, 'and (multi-way)', '', (v) => {
        names.push(v);
        write();
      }, 'no further column', true));
    }
  }
}

/** One model of a model decision, with what it is for beside it; the server says when the outcome does not fit it. */
function modelChoice(f, d, j, p, row) {
  const text = String(d.alternatives[j] || '');
  const known = MODELS.find((m) => m.value === text.trim().toLowerCase());
  const options = MODELS.map((m) => ({ value: m.value, text: m.text }));
  if (!known) options.push({ value: text, text: `${text || 'no model'} (not a model: choose one)` });
  const field = f.select(p, 'Model', options, known ? known.value : text, (v) => {
    d.alternatives[j] = v;
  }, true);
  const control = field.querySelector('select');
  const note = el('p', { class: 'hint model-note', id: `${control.id}-note` }, known ? known.note : '');
  control.setAttribute('aria-describedby', note.id);
  field.insertBefore(note, field.querySelector('.problem'));
  row.append(field);
}

/**
 * One alternative of an absorb decision: a field per absorbed column (its problems at columns[k]), and one more
 * to add a crossed column; problems of the list as a whole (too many levels for the exact rank of three or more,
 * a model that cannot absorb several) show at the list.
 */
function absorbChoice(f, a, p, row) {
  if (!Array.isArray(a.columns)) a.columns = [];
  const names = a.columns.slice();
  const write = () => { a.columns = names.filter((n) => n); };
  const list = el('div', { class: 'absorbed-columns', 'data-path': `${p}.columns` });
  names.forEach((name, k) => {
    list.append(f.column(`${p}.columns[${k}]`, k === 0 ? 'Absorb the fixed effects of' : 'and of', name, (v) => {
      names[k] = v;
      write();
    }, k === 0 ? 'none (no fixed effects)' : 'no further column', true));
  });
  const k = names.length;
  list.append(f.column(`${p}.columns[${k}]`, k === 0 ? 'Absorb the fixed effects of' : 'and of (crossed)', '',
    (v) => {
      names.push(v);
      write();
    }, k === 0 ? 'none (no fixed effects)' : 'no further column', true));
  if (names.length > 0) list.append(el('p', { class: 'hint absorb-note' }, ABSORB_HELP));
  list.append(el('p', { class: 'problem', hidden: true, role: 'alert' }));
  row.append(f.text(`${p}.label`, 'Label', a.label || '', (v) => { a.label = v; }), list);
}

/** One alternative of a weights decision: a label and a weight column, or none (unweighted). */
function weightChoice(f, a, p, row) {
  const field = f.column(`${p}.column`, 'Weight column', a.column || '', (v) => set(a, 'column', v),
    'none (unweighted)');
  const control = field.querySelector('select');
  const note = el('p', { class: 'hint choice-note', id: `${control.id}-note` }, WEIGHTS_HELP.text, ' ',
    el('span', { class: 'source' }, `Source: ${WEIGHTS_HELP.source}.`));
  control.setAttribute('aria-describedby', note.id);
  field.insertBefore(note, field.querySelector('.problem'));
  row.append(f.text(`${p}.label`, 'Label', a.label || '', (v) => { a.label = v; }), field);
}

function controls(f, d, path) {
  const box = el('div', { class: 'controls' });
  const sets = d.combine === 'sets';
  box.append(f.select(`${path}.combine`, 'Alternatives', [
    { value: 'all-subsets', text: 'every subset of the optional controls' },
    { value: 'sets', text: 'named sets of controls' },
  ], sets ? 'sets' : 'all-subsets', (v) => {
    if (v === 'sets') {
      d.combine = 'sets';
      delete d.optional;
      if (!d.sets || typeof d.sets !== 'object') d.sets = { 'set 1': [] };
    } else {
      delete d.combine;
      delete d.sets;
      if (!Array.isArray(d.optional)) d.optional = [];
    }
  }, true));
  if (!Array.isArray(d.required)) d.required = [];
  box.append(f.columnList(`${path}.required`, () => 'Required: in every specification', d.required,
    (v) => { d.required = v; }));
  if (!sets) {
    if (!Array.isArray(d.optional)) d.optional = [];
    box.append(f.columnList(`${path}.optional`, (chosen) => `Optional: every subset is an alternative (${
      chosen.length} chosen, ${(1n << BigInt(chosen.length)).toLocaleString('en')} subsets)`,
    d.optional, (v) => { d.optional = v; }));
    return box;
  }
  const labels = Object.keys(d.sets);
  labels.forEach((label, k) => {
    const p = `${path}.sets.${label}`;
    const chosen = d.sets[label];
    const rename = f.text(`${path}.sets`, `Set ${k + 1}: label`, label, (v) => {
      const next = {};
      for (const [key, value] of Object.entries(d.sets)) next[key === label ? v : key] = value;
      d.sets = next;
    });
    rename.querySelector('input').addEventListener('change', () => f.hooks.restructured(`${path}.sets`));
    box.append(el('div', { class: 'alternative' }, rename,
      button('Remove', `Remove set ${label}`, false, () => {
        delete d.sets[label];
        f.hooks.restructured(`${path}.sets`);
      })),
    f.columnList(p, () => `Columns of set "${label}"`, chosen, (v) => { d.sets[label] = v; }));
  });
  box.append(el('div', { class: 'add-row' }, button('Add a set', `Add a set of controls to ${d.name}`, false, () => {
    let k = labels.length + 1;
    while (`set ${k}` in d.sets) k += 1;
    d.sets[`set ${k}`] = [];
    f.hooks.restructured(`${path}.sets`);
  })));
  return box;
}

function addDecision(plan, hooks) {
  const id = 'new-decision-kind';
  const select = el('select', { id });
  for (const k of KINDS) select.append(el('option', { value: k }, KIND_TITLES[k]));
  select.value = 'controls';
  const add = el('button', { type: 'button', id: 'add-decision' }, 'Add the decision');
  add.addEventListener('click', () => {
    if (!Array.isArray(plan.decisions)) plan.decisions = [];
    plan.decisions.push(newDecision(select.value, plan));
    hooks.restructured('decisions');
  });
  return el('div', { class: 'add-row' }, el('div', { class: 'field' }, el('label', { for: id }, 'New decision'), select), add);
}

function settings(f, plan, defaults) {
  // the word "rows" means single rows, so a column of that name is left to the default (see README)
  const columns = [
    { value: '', text: 'the clusters the errors use, if one column (else single rows)' },
    { value: 'rows', text: 'single rows' },
    ...f.columns.filter((c) => c.name !== 'rows').map((c) => ({ value: c.name, text: `whole clusters of ${c.name}` })),
  ];
  const marked = (options, fallback) => options.map((o) => (o.value === fallback ? { ...o, text: `${o.text} (the default)` } : o));
  return el('section', { class: 'panel', 'aria-labelledby': 'settings-title' },
    el('h2', { id: 'settings-title' }, 'How the run is made'),
    el('div', { class: 'plan-settings' },
      f.number('confidence', 'Confidence level', plan.confidence ?? '', (v) => set(plan, 'confidence', v),
        { step: '0.01', min: '0', max: '1' },
        { value: String(defaults.confidence), words: `${defaults.confidence}, that is ${Math.round(defaults.confidence * 1000) / 10}% intervals` }),
      f.explained('missing', 'Rows with missing cells', marked([
        { value: 'per-specification', text: 'each specification uses its own complete rows' },
        { value: 'common', text: 'every specification uses the rows complete on all variables' },
      ], defaults.missing), plan.missing || defaults.missing, MISSING_HELP,
      (v) => set(plan, 'missing', v === defaults.missing ? '' : v)),
      f.number('sample', 'Fit a random sample of', plan.sample ?? '', (v) => set(plan, 'sample', v || ''),
        { step: '1', min: '0' },
        { value: String(defaults.sample), words: `${defaults.sample}, every specification is fitted` }),
      f.number('seed', 'Seed', plan.seed ?? '', (v) => set(plan, 'seed', v), { step: '1' },
        { value: String(defaults.seed), words: `${defaults.seed} (the same seed gives the same sample and draws)` }),
      f.number('maxSpecifications', 'Largest number of specifications', plan.maxSpecifications ?? '',
        (v) => set(plan, 'maxSpecifications', v), { step: '1', min: '1' },
        { value: String(defaults.maxSpecifications), words: countText(defaults.maxSpecifications) }),
      f.number('nullDraws', 'Null draws for joint inference', plan.nullDraws ?? '',
        (v) => set(plan, 'nullDraws', v), { step: '1', min: '0' },
        { value: String(defaults.nullDraws), words: `${defaults.nullDraws}, no null draws` }),
      f.explained('nullMethod', 'Null draws by', marked([
        { value: 'bootstrap', text: 'resampling (bootstrap)' },
        { value: 'permute', text: 'shuffling the key predictor' },
      ], defaults.nullMethod), plan.nullMethod || defaults.nullMethod, NULL_METHOD_HELP,
      (v) => set(plan, 'nullMethod', v === defaults.nullMethod ? '' : v)),
      f.select('nullCluster', 'The bootstrap resamples', columns, plan.nullCluster || '',
        (v) => set(plan, 'nullCluster', v))));
}

/** The element whose data-path is `path`, or the nearest enclosing one; {field, path}. */
function fieldFor(root, where) {
  const byPath = new Map([...root.querySelectorAll('[data-path]')].map((n) => [n.getAttribute('data-path'), n]));
  let path = where || '';
  for (;;) {
    const field = byPath.get(path);
    if (field || path === '') return { field: field || null, path };
    path = parentPath(path);
  }
}

/** Whether a field holds something the user (or the form, at their request) put there. */
function holdsValue(field) {
  if (!field.classList.contains('field')) return false;
  if (field.querySelector('input[type=checkbox]:checked')) return true;
  return [...field.querySelectorAll('input:not([type=checkbox]), select, textarea')].some((c) => c.value !== '');
}

/**
 * Shows every problem beside the field its JSON path names (or the nearest enclosing one), in words, with
 * the JSON path as the note's title for those who edit the file by hand. A problem at a field still empty
 * and untouched is held back until the user asks for every problem (`all`), so that a new plan opens
 * without errors; so is one about a whole section before anything in it was touched.
 *
 * @param problems [{where, message}]
 * @param state    {touched: Set of paths, all: boolean}
 * @return {shown: the notes shown, in order, held: problems held back}
 */
export function showProblems(root, problems, plan, state) {
  clearProblems(root);
  const shown = [];
  let held = 0;
  const touchedWithin = (path) => [...state.touched].some((t) => t === path || t.startsWith(`${path}.`)
    || t.startsWith(`${path}[`) || path === '');
  for (const { where, message } of problems) {
    const { field, path } = fieldFor(root, where);
    if (!field) continue;
    const visible = state.all || state.touched.has(path) || holdsValue(field)
      || (!field.classList.contains('field') && state.touched.size > 0 && touchedWithin(path));
    if (!visible) {
      held += 1;
      continue;
    }
    const note = [...field.children].find((c) => c.classList.contains('problem'));
    if (note) {
      const line = el('span', { class: 'problem-line', title: where || 'the whole plan' },
        problemInWords(where, message, plan));
      line.dataset.where = where;
      note.append(line);
      note.hidden = false;
      shown.push(note);
    }
    field.classList.add('has-problem');
    const control = field.querySelector('input, select, textarea');
    if (control && field.classList.contains('field')) control.setAttribute('aria-invalid', 'true');
  }
  return { shown, held };
}

export function clearProblems(root) {
  root.querySelectorAll('.problem').forEach((p) => {
    p.hidden = true;
    p.textContent = '';
  });
  root.querySelectorAll('.has-problem').forEach((n) => n.classList.remove('has-problem'));
  root.querySelectorAll('[aria-invalid]').forEach((n) => n.removeAttribute('aria-invalid'));
}

