// Many kernel requests share one caller's signal (a job's, a size map's rows, a sequence's frames). Each request
// links its own stop controller to that signal here, and the signal carries a single "abort" listener however many
// requests are linked: the listener is added with the first link and removed with the last unlink, so nothing
// accumulates on a long-lived signal and Node's MaxListenersExceededWarning (more than 10 listeners) cannot fire.

interface Links {
  controllers: Set<AbortController>;
  onAbort: () => void;
}

const linksBySignal = new WeakMap<AbortSignal, Links>();

/**
 * Aborts `controller` with the signal's reason when `signal` aborts, until the returned unlink is called. A signal
 * that is already aborted links nothing (as an "abort" listener added to it would never run); the caller checks it.
 */
export function linkAbort(signal: AbortSignal | undefined, controller: AbortController): () => void {
  if (!signal || signal.aborted) return () => undefined;
  let links = linksBySignal.get(signal);
  if (!links) {
    const controllers = new Set<AbortController>();
    const onAbort = () => {
      linksBySignal.delete(signal);
      for (const c of controllers) c.abort(signal.reason);
      controllers.clear();
    };
    links = { controllers, onAbort };
    linksBySignal.set(signal, links);
    signal.addEventListener("abort", onAbort, { once: true });
  }
  const own = links;
  own.controllers.add(controller);
  return () => {
    if (!own.controllers.delete(controller) || own.controllers.size > 0) return;
    signal.removeEventListener("abort", own.onAbort);
    if (linksBySignal.get(signal) === own) linksBySignal.delete(signal);
  };
}
