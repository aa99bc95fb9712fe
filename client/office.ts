// Office pages' entry: their stylesheet plus two progressive enhancements that stay out of
// inline handlers (the CSP allows only our own scripts). Pages work without this script.
import './styles/office.css';

// <form data-confirm="Delete this ranch?"> asks before submitting. A form that the server would
// first answer with a confirmation page (data-confirm-page) says it is confirmed once asked here.
document.addEventListener('submit', (event) => {
  const form = event.target;
  if (!(form instanceof HTMLFormElement)) return;
  const question = form.dataset.confirm;
  if (!question) return;
  if (!window.confirm(question)) {
    event.preventDefault();
    return;
  }
  if (form.hasAttribute('data-confirm-page') && !form.querySelector('input[name="confirmed"]')) {
    const confirmed = document.createElement('input');
    Object.assign(confirmed, { type: 'hidden', name: 'confirmed', value: 'yes' });
    form.append(confirmed);
  }
});

// Instants are written by the server in UTC, zone named ("Dec 2, 2026, 14:05 UTC": dateTime in
// shared/format/figures.ts). The reader's browser writes them again in the reader's own time zone,
// in the same form, keeping the UTC text as the title; a calendar date has no zone and stays. (The
// browser's own formatter, not an import of shared/: the build would pull the capture app's first
// chunk into the office pages with it.)
const readerZone = Intl.DateTimeFormat().resolvedOptions().timeZone;
if (readerZone && readerZone !== 'UTC') {
  const inReaderZone = new Intl.DateTimeFormat('en-US', {
    timeZone: readerZone, hourCycle: 'h23', month: 'short', day: 'numeric', year: 'numeric', hour: '2-digit', minute: '2-digit', timeZoneName: 'short',
  });
  for (const time of document.querySelectorAll('time[datetime]')) {
    if (!(time instanceof HTMLTimeElement) || !/\d[T ]\d\d:\d\d/.test(time.dateTime)) continue;
    const zoneless = !/(Z|[+-]\d\d:?\d\d)$/.test(time.dateTime); // SQLite's CURRENT_TIMESTAMP is UTC
    const at = new Date(zoneless ? `${time.dateTime.replace(' ', 'T')}Z` : time.dateTime);
    if (Number.isNaN(at.getTime())) continue;
    time.title = time.textContent ?? '';
    time.textContent = inReaderZone.format(at);
  }
}

// <button type="button" data-print> opens the print dialog.
document.addEventListener('click', (event) => {
  const target = event.target instanceof Element ? event.target.closest('[data-print]') : null;
  if (target) window.print();
});

// ---- Registry CSV import (views/registry/import*.ejs, server/routes/office/registry-import.ts) ----
// The upload goes through XMLHttpRequest: it reports upload progress, and it carries the CSRF
// token in the X-CSRF-Token header, because lusca checks the token before multer has read the
// multipart body. The commit runs as a background job on the server; this polls its progress.

interface ImportStatus {
  phase: 'uploaded' | 'checking' | 'writing' | 'imported' | 'failed' | 'error';
  done: number;
  total: number;
  percent: number;
  result: { rows: number; ranchesCreated: string[]; fieldsCreated: number; plantingsCreated: number } | null;
  message: string | null;
  previewUrl: string;
  statusUrl: string;
  resultUrl: string;
}

const importCount = (n: number, one: string, many: string) => `${n.toLocaleString('en-US')} ${n === 1 ? one : many}`;

function importParts(form: HTMLFormElement) {
  const token = (form.elements.namedItem('_csrf') as HTMLInputElement | null)?.value ?? '';
  const error = form.querySelector<HTMLElement>('[data-import-error]');
  const box = form.querySelector<HTMLElement>('[data-import-progress], [data-import-job]');
  const bar = box?.querySelector('progress') ?? null;
  const text = box?.querySelector<HTMLElement>('[data-import-progress-text]') ?? null;
  const button = form.querySelector<HTMLButtonElement>('button[type="submit"]');
  const showError = (message: string) => {
    if (error) {
      error.textContent = message;
      error.hidden = false;
    }
    if (box) box.hidden = true;
    if (button) button.disabled = false;
  };
  const showProgress = (percent: number | null, message: string) => {
    if (error) error.hidden = true;
    if (box) box.hidden = false;
    if (bar) {
      if (percent === null) bar.removeAttribute('value'); // indeterminate while the server works
      else bar.value = percent;
    }
    if (text) text.textContent = message;
  };
  return { token, button, showError, showProgress };
}

function uploadImport(form: HTMLFormElement) {
  const { token, button, showError, showProgress } = importParts(form);
  const file = (form.elements.namedItem('file') as HTMLInputElement | null)?.files?.[0];
  if (!file) return showError('Choose a CSV file first.');
  const maxBytes = Number(form.dataset.maxBytes || Infinity);
  if (file.size > maxBytes) return showError(`The file is larger than ${Math.round(maxBytes / 1024 / 1024)} MB. Split it into smaller files.`);
  if (button) button.disabled = true;
  const xhr = new XMLHttpRequest();
  xhr.open('POST', form.action);
  xhr.setRequestHeader('X-CSRF-Token', token);
  xhr.setRequestHeader('Accept', 'application/json');
  xhr.upload.onprogress = (e) => {
    if (e.lengthComputable) {
      const percent = Math.floor((100 * e.loaded) / e.total);
      showProgress(percent, `Uploading ${file.name}: ${percent} %`);
    }
  };
  xhr.upload.onload = () => showProgress(null, 'Uploaded. Reading and checking the rows…');
  xhr.onerror = () => showError('The upload failed. Check the connection and try again.');
  xhr.onload = () => {
    let body: { previewUrl?: string; error?: { message?: string } } | null = null;
    try {
      body = JSON.parse(xhr.responseText);
    } catch {
      body = null;
    }
    if (xhr.status >= 200 && xhr.status < 300 && body?.previewUrl) {
      showProgress(100, 'Opening the preview…');
      window.location.assign(body.previewUrl);
    } else {
      showError(body?.error?.message ?? `The upload was refused (HTTP ${xhr.status}). Reload the page and try again.`);
    }
  };
  showProgress(0, `Uploading ${file.name}…`);
  xhr.send(new FormData(form));
}

async function commitImport(form: HTMLFormElement) {
  const { token, button, showError, showProgress } = importParts(form);
  const done = form.querySelector<HTMLElement>('[data-import-done]');
  const doneText = form.querySelector<HTMLElement>('[data-import-done-text]');
  const params = new URLSearchParams();
  for (const [key, value] of new FormData(form)) if (typeof value === 'string') params.append(key, value);
  if (button) button.disabled = true;
  showProgress(0, 'Starting the import…');
  const headers = { Accept: 'application/json', 'X-CSRF-Token': token };
  const read = async (res: Response): Promise<ImportStatus | null> => (res.ok ? ((await res.json()) as ImportStatus) : null);
  try {
    let status = await read(await fetch(form.action, { method: 'POST', body: params, headers, credentials: 'same-origin' }));
    for (;;) {
      if (!status) return showError('The import could not be started or followed. Reload the page to see where it stands.');
      if (status.phase === 'imported') {
        const r = status.result;
        showProgress(100, 'Import complete: 100 %');
        if (doneText && r) {
          doneText.textContent = `Imported ${importCount(r.rows, 'row', 'rows')}: ${importCount(r.ranchesCreated.length, 'new ranch', 'new ranches')}, ${importCount(r.fieldsCreated, 'new field', 'new fields')}, ${importCount(r.plantingsCreated, 'planting', 'plantings')}.`;
        }
        if (done) done.hidden = false;
        return;
      }
      if (status.phase === 'failed') return window.location.assign(status.previewUrl);
      if (status.phase === 'error') return showError(status.message ?? 'The import stopped on an error; nothing was written.');
      const total = status.total.toLocaleString('en-US');
      if (status.phase === 'writing') {
        showProgress(status.percent, `Writing ${total} rows in one transaction (all or nothing)… ${status.percent} %`);
      } else {
        showProgress(status.percent, `Checking rows: ${status.done.toLocaleString('en-US')} of ${total}… ${status.percent} %`);
      }
      await new Promise((resolve) => setTimeout(resolve, 300));
      status = await read(await fetch(status.statusUrl, { headers: { Accept: 'application/json' }, credentials: 'same-origin' }));
    }
  } catch {
    showError('The connection was lost. Reload the page to see whether the import finished.');
  }
}

document.addEventListener('submit', (event) => {
  const form = event.target;
  if (!(form instanceof HTMLFormElement) || event.defaultPrevented) return;
  if (form.matches('[data-import-upload]')) {
    event.preventDefault();
    uploadImport(form);
  } else if (form.matches('[data-import-commit]')) {
    event.preventDefault();
    void commitImport(form);
  }
});
// ---- end of the registry CSV import ----

// ---- Credit registers: the organisation's register built in the background (views/registers/index.ejs) ----
// The form posts with fetch (CSRF token in X-CSRF-Token), then polls GET /registers/jobs/:id and
// moves the <progress> bar until the files are ready. Without script the form posts normally and
// the page shows the job's state on reload.

interface RegisterJobStatus {
  phase: 'queued' | 'computing' | 'writing' | 'done' | 'failed';
  percent: number;
  fieldsTotal: number;
  error: string | null;
  result: { ranches: number; rows: number; csvUrl: string; pdfUrl: string } | null;
  statusUrl?: string;
}

async function followRegisterJob(form: HTMLFormElement, statusUrl: string, first?: RegisterJobStatus) {
  const box = form.querySelector<HTMLElement>('[data-register-job-progress]');
  const bar = form.querySelector('progress');
  const text = form.querySelector<HTMLElement>('[data-register-job-text]');
  const done = form.querySelector<HTMLElement>('[data-register-job-done]');
  const error = form.querySelector<HTMLElement>('[data-register-job-error]');
  const button = form.querySelector<HTMLButtonElement>('button[type="submit"]');
  const fail = (message: string) => {
    if (error) {
      error.textContent = message;
      error.hidden = false;
    }
    if (button) button.disabled = false;
  };
  if (box) box.hidden = false;
  if (done) done.hidden = true;
  if (error) error.hidden = true;
  if (button) button.disabled = true;
  let status: RegisterJobStatus | undefined = first;
  for (;;) {
    if (status) {
      if (bar) bar.value = status.percent;
      if (bar) bar.textContent = `${status.percent} %`;
      const words = { queued: 'Waiting to start', computing: 'Computing the rows', writing: 'Writing the files', done: 'Ready', failed: 'Failed' }[status.phase];
      if (text) text.textContent = `${words}: ${status.percent} %${status.fieldsTotal ? ` of ${status.fieldsTotal.toLocaleString('en-US')} fields` : ''}`;
      if (status.phase === 'done' && status.result) {
        if (text) text.textContent = `Ready: ${status.result.rows.toLocaleString('en-US')} fields of ${status.result.ranches} ranches (100 %).`;
        form.querySelector<HTMLAnchorElement>('[data-register-job-csv]')?.setAttribute('href', status.result.csvUrl);
        form.querySelector<HTMLAnchorElement>('[data-register-job-pdf]')?.setAttribute('href', status.result.pdfUrl);
        if (done) done.hidden = false;
        if (button) button.disabled = false;
        return;
      }
      if (status.phase === 'failed') return fail(status.error ?? 'The register could not be built.');
    }
    await new Promise((resolve) => setTimeout(resolve, 400));
    try {
      const res = await fetch(statusUrl, { headers: { Accept: 'application/json' }, credentials: 'same-origin' });
      if (!res.ok) return fail(res.status === 404 ? 'This build has expired. Start a new one.' : `The progress could not be read (HTTP ${res.status}).`);
      status = (await res.json()) as RegisterJobStatus;
    } catch {
      return fail('The connection was lost. Reload the page to see whether the build finished.');
    }
  }
}

document.addEventListener('submit', (event) => {
  const form = event.target;
  if (!(form instanceof HTMLFormElement) || event.defaultPrevented || !form.matches('[data-register-job]')) return;
  event.preventDefault();
  const token = (form.elements.namedItem('_csrf') as HTMLInputElement | null)?.value ?? '';
  const body = new URLSearchParams();
  for (const [key, value] of new FormData(form)) if (typeof value === 'string') body.append(key, value);
  void (async () => {
    try {
      const res = await fetch(form.action, { method: 'POST', body, headers: { Accept: 'application/json', 'X-CSRF-Token': token }, credentials: 'same-origin' });
      const status = (await res.json()) as RegisterJobStatus & { error?: { message?: string } };
      if (!res.ok || !status.statusUrl) {
        const message = (status.error as { message?: string } | null)?.message ?? `The build could not be started (HTTP ${res.status}).`;
        const el = form.querySelector<HTMLElement>('[data-register-job-error]');
        if (el) {
          el.textContent = message;
          el.hidden = false;
        }
        return;
      }
      await followRegisterJob(form, status.statusUrl, status);
    } catch {
      form.submit();
    }
  })();
});

// A build started without script (or before a reload) carries its status URL: follow it.
for (const form of document.querySelectorAll<HTMLFormElement>('form[data-register-job][data-register-job-status]')) {
  void followRegisterJob(form, form.dataset.registerJobStatus!);
}
// ---- end of credit registers ----
