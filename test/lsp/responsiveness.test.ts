// The analysis runs beside the protocol: a hover is answered while a big circuit is
// being checked, and a newer edit stops the older analysis instead of queueing behind it.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeFolder, startServer, type TestClient } from './harness.js';

/** An invented indicator panel big enough that its check takes a while: LED branches on one rail. */
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

  // 20,000 LED branches: a check of seconds even on a quiet machine (about 1 s per 8,000 branches
  // here), so that the requests below, sent 50 ms after opening, arrive while it runs.
  const BIG = ledPanel(20_000);
  const WHILE_CHECKING_MILLISECONDS = 50;

  it('answers a hover while a big circuit is being checked', async () => {
    const uri = workspace.uri('big.cir');
    client.open(uri, BIG);
    await new Promise((resolve) => setTimeout(resolve, WHILE_CHECKING_MILLISECONDS));
    await client.request('textDocument/hover', { textDocument: { uri }, position: { line: 3, character: 1 } });
    // Answered while the check still runs: in the protocol thread it would have waited for it.
    expect(client.publishedFor(uri)).toEqual([]);
    client.closeDocument(uri);
  });

  // Long enough for the check of version 1 to have started (its settings come from the client
  // first: an edit before they arrive skips version 1 altogether), well short of its end.
  const CHECK_STARTED_MILLISECONDS = 500;

  it('a newer edit cancels the analysis of the older text', async () => {
    const uri = workspace.uri('edited.cir');
    client.open(uri, BIG);
    await new Promise((resolve) => setTimeout(resolve, CHECK_STARTED_MILLISECONDS));
    client.change(uri, 2, [{ text: SMALL }]);
    const published = await client.diagnostics(uri, { version: 2 });
    expect(published.version).toBe(2);
    // The small text has nothing to report (and no internal error stands in for its check).
    expect(published.diagnostics).toEqual([]);
    expect(client.publishedFor(uri).map((p) => p.version)).toEqual([2]);
    // Version 1's analysis was stopped part-way (by its cancellation flag, or by replacing its worker), not run to the end.
    expect(client.logs.some((line) => line.includes(`check of ${uri} (version 1) stopped early`))).toBe(true);
  });
});
