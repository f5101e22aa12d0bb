/** Receiving host messages in a webview (webview/shared/hostMessages.ts): the guard decides, errors are reported. */
import assert from 'node:assert/strict';
import { receiveHostMessages } from '../../webview/shared/hostMessages';

function isGreeting(x: unknown): x is { type: 'greet'; name: string } {
  return (
    typeof x === 'object' && x !== null && (x as { type?: unknown }).type === 'greet' && typeof (x as { name?: unknown }).name === 'string'
  );
}

describe('webview: receiving host messages', () => {
  it('only messages the guard accepts are handled; an error while handling is reported by its text', () => {
    const page = new EventTarget();
    const handled: string[] = [];
    const errors: string[] = [];
    receiveHostMessages(
      page,
      isGreeting,
      (m) => {
        if (m.name === 'bad') throw new Error('cannot greet bad');
        handled.push(m.name);
      },
      (message) => errors.push(message),
    );
    const post = (data: unknown): boolean => page.dispatchEvent(new MessageEvent('message', { data }));
    post({ type: 'greet', name: 'Si' });
    post({ type: 'greet', name: 42 });
    post('greet');
    post(null);
    post({ type: 'greet', name: 'bad' });
    post({ type: 'greet', name: 'GaAs' });
    assert.deepEqual(handled, ['Si', 'GaAs']);
    assert.deepEqual(errors, ['cannot greet bad']);
  });
});
