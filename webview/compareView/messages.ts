/**
 * Messages from the host: checked by the protocol's guard (anything else is ignored), then handed to the
 * view. A message the view cannot show is reported in the status line and to the host, never thrown.
 */
import {
  CompareHostToViewType,
  CompareViewToHostType,
  isCompareHostToViewMessage,
  type CompareHostToViewMessage,
} from '../../src/protocol';
import type { CompareViewApp } from './compareApp';
import { receiveHostMessages } from '../shared/hostMessages';

/** Hands one checked host message to the view. */
export function handleHostMessage(app: CompareViewApp, m: CompareHostToViewMessage): void {
  switch (m.type) {
    case CompareHostToViewType.Progress:
      app.showProgress(m.message, m.found ? `${m.done} of ${m.found} runs read` : m.message);
      break;
    case CompareHostToViewType.Table:
      app.setTable(m.table);
      break;
    case CompareHostToViewType.Bands:
      app.onBands(m.runs, m.missing);
      break;
    case CompareHostToViewType.Notice:
      app.setStatus(m.message);
      break;
  }
}

/** Listens to the host's messages for the life of the page. */
export function listenToHost(app: CompareViewApp): void {
  receiveHostMessages(
    window,
    isCompareHostToViewMessage,
    (m) => handleHostMessage(app, m),
    (msg) => {
      app.setStatus(`The compare view could not show this: ${msg}`);
      app.post({ type: CompareViewToHostType.ViewError, message: msg.slice(0, 3000) });
    },
  );
}
