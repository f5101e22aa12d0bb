/**
 * Receiving the extension host's messages: only what the protocol's guard accepts reaches the view (anything
 * else posted to the page is ignored), and an error while handling one is reported with its text instead of
 * escaping into the page.
 */
export function receiveHostMessages<M>(
  target: Pick<EventTarget, 'addEventListener'>,
  accepts: (raw: unknown) => raw is M,
  handle: (m: M) => void,
  onError: (message: string) => void,
): void {
  target.addEventListener('message', (ev: Event) => {
    const raw: unknown = (ev as MessageEvent).data;
    if (!accepts(raw)) return;
    try {
      handle(raw);
    } catch (e) {
      onError(e instanceof Error ? e.message : String(e));
    }
  });
}
