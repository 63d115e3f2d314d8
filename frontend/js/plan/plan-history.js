// The plan page's list of saved versions, drawn again from the JSON API after a save from the form, so that
// the new version appears without reloading the page (the server draws the same rows on load).

import { getJson } from '../api.js';
import { append, clear, el } from '../helpers.js';

function row(analysis, v) {
  const base = `/analyses/${encodeURIComponent(analysis)}`;
  const runs = [];
  v.runs.forEach((r, i) => {
    if (i > 0) runs.push(', ');
    runs.push(el('a', { href: `${base}/runs/${encodeURIComponent(r)}` }, r));
  });
  const actions = el('td', {}, el('a', { href: `${base}/plan/versions/${v.version}`, id: `view-version-${v.version}` },
    'View'));
  if (!v.working) {
    append(actions, ' ', el('form', { method: 'post', class: 'inline-form',
      action: `${base}/plan/versions/${v.version}/restore` },
    el('button', { type: 'submit', class: 'small', id: `restore-version-${v.version}` }, 'Restore as the working plan')));
  }
  return el('tr', { 'data-version': v.version, 'data-sha256': v.sha256 },
    el('td', {}, String(v.version), v.working ? [' ', el('span', { class: 'badge' }, 'working plan')] : null,
      v.restoredFrom > 0 ? [' ', el('span', { class: 'hint' }, `(restores version ${v.restoredFrom})`)] : null),
    el('td', {}, v.saved), el('td', {}, el('code', {}, v.sha256)), el('td', {}, runs), actions);
}

export async function refreshHistory(analysis) {
  const table = document.getElementById('plan-versions');
  if (!table) return;
  const versions = await getJson(`/api/analyses/${encodeURIComponent(analysis)}/plan/versions`);
  const body = clear(table.querySelector('tbody'));
  versions.forEach((v) => append(body, row(analysis, v)));
  table.hidden = versions.length === 0;
  const none = document.getElementById('no-versions');
  if (none) none.hidden = versions.length > 0;
}
