/**
 * One editor for the scenarios of a test file: started by the first scenario that needs it (a failed start fails
 * each), closed after the file. Registered hooks: a screenshot of a failed scenario and, optionally, every editor
 * closed after each scenario so the next one starts clean.
 */
import { EditorSession, type SessionOptions } from './editorSession';

export class SharedSession {
  private starting: Promise<EditorSession> | undefined;

  constructor(private readonly opts: SessionOptions) {}

  get(): Promise<EditorSession> {
    this.starting ??= EditorSession.start(this.opts);
    return this.starting;
  }

  /**
   * Call inside the file's `describe`. `failedShot`: one screenshot name for any failed scenario (default: the
   * scenario's title); `closeEditors`: close every editor after each scenario.
   */
  hooks(o: { closeEditors: boolean; failedShot?: string }): void {
    after(async () => {
      if (this.starting) await (await this.starting.catch(() => undefined))?.close();
    });
    const started = (): Promise<EditorSession | undefined> | undefined => this.starting?.catch(() => undefined);
    afterEach(async function () {
      const s = await started();
      if (!s) return;
      const name = o.failedShot ?? `failed-${(this.currentTest?.title ?? 'scenario').replace(/[^a-z0-9]+/gi, '-').toLowerCase()}`;
      if (this.currentTest?.state === 'failed') await s.screenshot(name).catch(() => undefined);
      if (o.closeEditors) await s.closeAllEditors().catch(() => undefined);
    });
  }
}
