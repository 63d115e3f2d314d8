// The JSON API, as the pages use it. Problems come back as {where, message}.

export class ApiError extends Error {
  constructor(status, where, message) {
    super(message);
    this.status = status;
    this.where = where || '';
  }
}

async function answer(response) {
  const text = await response.text();
  let body = null;
  try {
    body = text ? JSON.parse(text) : null;
  } catch (e) {
    body = null;
  }
  if (!response.ok) {
    const message = body && body.message ? body.message : `the server answered ${response.status}`;
    throw new ApiError(response.status, body ? body.where : '', message);
  }
  return body;
}

export async function getJson(url, signal) {
  return answer(await fetch(url, { headers: { Accept: 'application/json' }, signal }));
}

/** Sends `text` (already JSON) with the given method. */
export async function sendJson(method, url, text) {
  return answer(await fetch(url, {
    method,
    headers: { Accept: 'application/json', 'Content-Type': 'application/json' },
    body: text,
  }));
}

export async function post(url) {
  return answer(await fetch(url, { method: 'POST', headers: { Accept: 'application/json' } }));
}
