// Renders beyond the service's synchronous limit run as background jobs (POST /v1/jobs): the page follows the
// job's event stream with a progress bar (fraction, stage, time left), fetches the result when it is done, and
// cancels the job (DELETE /v1/jobs/:id) when its signal is aborted (the Stop button, or a change of settings).

/** "about 12 s left"; empty while the service has no estimate. */
function timeLeft(seconds) {
  if (typeof seconds !== "number") return "";
  if (seconds < 1) return "under a second left";
  return seconds < 60 ? `about ${Math.round(seconds)} s left` : `about ${Math.floor(seconds / 60)} min ${Math.round(seconds % 60)} s left`;
}

/** Whether a refused synchronous answer says the render is too costly to run synchronously. */
export function tooCostly(status, error) {
  return status === 422 && error && error.error === "too-costly";
}

/**
 * Runs endpoint (profile, lut, view, figure-chromaticity …) with body and query as a job; resolves with the
 * result's Response. bar: { progress (a <progress>), text (an element) }. extra: more fields of the job, such as
 * { sequence } for a span of time.
 */
export async function runAsJob(endpoint, body, query, signal, bar, extra = {}) {
  const submitted = await fetch("/v1/jobs", {
    method: "POST",
    headers: { "content-type": "application/json" },
    body: JSON.stringify({ endpoint, body, query, ...extra }),
    signal,
  });
  const job = await submitted.json();
  if (!submitted.ok) throw new Error(job.message ?? `the service refused the job (${submitted.status})`);
  bar.progress.hidden = false;
  bar.progress.value = job.progress.fraction;
  bar.progress.dataset.job = job.id;
  bar.text.textContent = "queued";
  try {
    if (job.state !== "done") await followJob(job.id, signal, bar);
    const result = await fetch(`/v1/jobs/${job.id}/result`, { signal });
    if (!result.ok) throw new Error((await result.json().catch(() => ({}))).message ?? `no result (${result.status})`);
    return result;
  } finally {
    bar.progress.hidden = true;
    bar.text.textContent = "";
  }
}

function followJob(id, signal, bar) {
  return new Promise((resolve, reject) => {
    const events = new EventSource(`/v1/jobs/${id}/events`);
    const stop = () => {
      events.close();
      fetch(`/v1/jobs/${id}`, { method: "DELETE" }).catch(() => undefined);
      reject(new DOMException("the job was stopped", "AbortError"));
    };
    if (signal.aborted) return stop();
    signal.addEventListener("abort", stop, { once: true });
    const finish = (fn) => {
      signal.removeEventListener("abort", stop);
      events.close();
      fn();
    };
    events.addEventListener("progress", (e) => {
      const { progress } = JSON.parse(e.data);
      bar.progress.value = progress.fraction;
      bar.text.textContent = `${Math.floor(progress.fraction * 100)} % ${progress.stage} ${timeLeft(progress.secondsLeft)}`.trim();
    });
    events.addEventListener("done", () => finish(resolve));
    events.addEventListener("failed", (e) => finish(() => reject(new Error(JSON.parse(e.data).error ?? "the job failed"))));
    events.addEventListener("cancelled", () => finish(() => reject(new DOMException("the job was cancelled", "AbortError"))));
    // The stream closes after its final event; an error before that is the connection lost.
    events.onerror = () => {
      if (events.readyState === EventSource.CLOSED) finish(() => reject(new Error("lost the job's event stream")));
    };
  });
}
