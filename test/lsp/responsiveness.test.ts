// The analysis runs beside the protocol: a hover is answered while a big circuit is
// being checked, and a newer edit stops the older analysis instead of queueing behind it.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeFolder, startServer, type TestClient } from './harness.js';

/** An invented indicator panel big enough that its check takes seconds: LED branches on one rail. */
function ledPanel(branches: number): string {
  const lines = ['big indicator panel', 'V1 vcc 0 DC 5', '.model DRED D(IS=1e-20 N=1.9 RS=2)'];
  for (let i = 1; i <= branches; i++) lines.push(`R${i} vcc n${i} 330`, `D${i} n${i} 0 DRED`);
  return `${lines.join('\n')}\n.end\n`;
}
const SMALL = 'small panel\nV1 vcc 0 DC 5\nR1 vcc 0 1k\n.end\n';

describe('responsiveness', () => {
  let client: TestClient;
  const workspace = makeFolder({});

  beforeAll(async () => {
    client = await startServer({ folders: [workspace.folder], settings: { debounceMilliseconds: 0 } });
  });
  afterAll(async () => {
    await client.stop();
    workspace.cleanup();
  });

  // 1,000 LED branches: a check of many seconds, so that the requests below arrive while it runs.
  const BIG = ledPanel(1000);

  it('answers a hover while a big circuit is being checked', async () => {
    const uri = workspace.uri('big.cir');
    client.open(uri, BIG);
    await new Promise((resolve) => setTimeout(resolve, 300));
    const sent = Date.now();
    await client.request('textDocument/hover', { textDocument: { uri }, position: { line: 3, character: 1 } });
    // Answered before the check finished, and promptly (a generous bound for a loaded 2-core machine).
    expect(client.publishedFor(uri)).toEqual([]);
    expect(Date.now() - sent).toBeLessThan(1_000);
    client.closeDocument(uri);
  });

  it('a newer edit cancels the analysis of the older text', async () => {
    const uri = workspace.uri('edited.cir');
    client.open(uri, BIG);
    await new Promise((resolve) => setTimeout(resolve, 300));
    const started = Date.now();
    client.change(uri, 2, [{ text: SMALL }]);
    const published = await client.diagnostics(uri, { version: 2 });
    const waited = Date.now() - started;
    expect(published.version).toBe(2);
    // The small text has nothing to report (and no internal error stands in for its check).
    expect(published.diagnostics).toEqual([]);
    // Version 1 is never published: its analysis was stopped.
    expect(client.publishedFor(uri).map((p) => p.version)).toEqual([2]);
    // Well under the many seconds the big panel's check takes: the old analysis did not run on.
    expect(waited).toBeLessThan(3_000);
  });
});
