// Drives VS Code's workbench as a person would: opens a netlist whose LED has
// no series resistor, waits for the red squiggle, reads the Problems panel and
// the status bar, hovers the diode, applies a quick fix from the Ctrl+. menu,
// and checks the new text and that the finding cleared. A PNG at each step.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';

const LED_RULE = 'led-current-unlimited';
/** Longest wait for one thing to appear in the workbench (2 shared cores; common practice, no source). */
const STEP_WAIT_MILLISECONDS = 60_000;
const QUICK_FIX_ATTEMPTS = 3;
/** Size of the editor pictures kept for the README (pixels). */
const README_PICTURE_WIDTH = 860;
const README_PICTURE_HEIGHT = 420;

/** The editor's text as shown (Monaco renders spaces as non-breaking spaces). */
async function editorText(page) {
  const lines = await page.locator('.monaco-editor .view-lines .view-line').evaluateAll((elements) =>
    elements
      .map((element) => ({ top: parseFloat(element.style.top || '0'), text: element.textContent ?? '' }))
      .sort((a, b) => a.top - b.top)
      .map((line) => line.text.replace(/\u00a0/g, ' ')),
  );
  return lines.join('\n');
}

/** The rendered line of the editor whose text starts with `prefix`. */
function editorLine(page, prefix) {
  return page.locator('.monaco-editor .view-lines .view-line').filter({ hasText: new RegExp(`^${prefix.replace(/\s/g, '\\s')}`) }).first();
}

/** A page with numbered steps: each passes or fails on its own, with a screenshot on failure. */
async function openSession(context, artifacts, firstStepNumber) {
  const passed = [];
  const failures = [];
  const pending = [];
  const page = await context.newPage();
  page.setDefaultTimeout(STEP_WAIT_MILLISECONDS);
  let stepNumber = firstStepNumber - 1;
  const shoot = async (name, region) => {
    const file = join(artifacts, name);
    try {
      // A region: the top of the editor part only, small enough for the README.
      const box = region ? await region.boundingBox() : null;
      const clip = box ? { x: box.x, y: box.y, width: Math.min(box.width, README_PICTURE_WIDTH), height: Math.min(box.height, README_PICTURE_HEIGHT) } : undefined;
      await page.screenshot({ path: file, clip });
    } catch (error) {
      failures.push(`screenshot ${name}: ${error instanceof Error ? error.message : String(error)}`);
    }
  };
  /** Runs one step; a failed step stops the steps that depend on it. */
  const step = async (title, body) => {
    stepNumber += 1;
    const label = `${String(stepNumber).padStart(2, '0')} ${title}`;
    try {
      await body();
      passed.push(title);
      process.stdout.write(`  ✓ ${label}\n`);
      return true;
    } catch (error) {
      failures.push(`${title}: ${error instanceof Error ? error.message.split('\n')[0] : String(error)}`);
      process.stdout.write(`  ✗ ${label}\n`);
      await shoot(`${String(stepNumber).padStart(2, '0')}-failed.png`);
      return false;
    }
  };
  const finish = async () => {
    await page.close().catch(() => {});
    return { passed, failures, pending };
  };
  return { page, shoot, step, finish, pending };
}

function workbenchUrl(server, workspace, remoteUri, netlist) {
  const payload = JSON.stringify([['openFile', remoteUri(join(workspace, netlist))]]);
  return `${server.origin}/?folder=${encodeURIComponent(workspace)}&payload=${encodeURIComponent(payload)}`;
}

/**
 * In Restricted Mode the netlist's include from outside the workspace is not read,
 * and the user is told why (the same netlist is clean in a trusted workspace: see the suite).
 */
export async function checkRestrictedMode(context, server, { workspace, artifacts, netlist, remoteUri }) {
  const { page, step, shoot, finish } = await openSession(context, artifacts, 7);
  await step('in an untrusted workspace the include from outside it is refused, and says why', async () => {
    await page.goto(workbenchUrl(server, workspace, remoteUri, netlist), { waitUntil: 'domcontentloaded' });
    await page.locator('.monaco-workbench').waitFor();
    await page.locator('.statusbar-item').filter({ hasText: /Restricted Mode/i }).first().waitFor();
    await editorLine(page, 'D1 ').waitFor();
    await showProblems(page);
    await page.locator('.markers-panel .monaco-list-row').filter({ hasText: /untrusted/i }).first().waitFor();
    await shoot('07-restricted-mode.png');
  });
  return finish();
}

export async function driveWorkbench(context, server, { workspace, artifacts, netlist, remoteUri }) {
  const { page, step, shoot, finish, pending } = await openSession(context, artifacts, 1);
  const editor = page.locator('.part.editor');
  // The LED's line as the fixture has it (the rendered line also holds inlay hints).
  const ledLineText = readFileSync(join(workspace, netlist), 'utf8').split(/\r?\n/).find((line) => line.startsWith('D1 '));

  const opened = await step('open the netlist and see the red squiggle under the LED', async () => {
    await page.goto(workbenchUrl(server, workspace, remoteUri, netlist), { waitUntil: 'domcontentloaded' });
    await page.locator('.monaco-workbench').waitFor();
    await editorLine(page, 'D1 ').waitFor();
    await page.locator('.monaco-editor .squiggly-error').first().waitFor().catch(async (error) => {
      const statusBar = (await page.locator('.statusbar').first().textContent().catch(() => '')) ?? '';
      throw new Error(`${error.message.split('\n')[0]}; the status bar reads ${JSON.stringify(statusBar)}`);
    });
    await shoot('01-squiggle.png');
    await shoot('squiggle-editor.png', editor);
  });
  if (!opened) return finish();

  await step('the status bar counts the error', async () => {
    const item = page.locator('.statusbar-item').filter({ hasText: /pnlint [1-9]\d* errors?/ });
    await item.first().waitFor();
  });

  await step('the Problems panel lists the finding with its rule id', async () => {
    await editorLine(page, 'D1 ').click();
    await showProblems(page);
    const row = page.locator('.markers-panel .monaco-list-row').filter({ hasText: LED_RULE });
    await row.first().waitFor();
    const text = await row.first().textContent();
    if (!text?.includes(LED_RULE)) throw new Error(`the Problems entry reads ${JSON.stringify(text)}`);
    process.stdout.write(`     Problems panel: ${text.trim()}\n`);
    await shoot('02-problems-panel.png');
    await page.keyboard.press('Control+Shift+M'); // close the panel again
    await page.locator('.markers-panel').first().waitFor({ state: 'hidden', timeout: 5_000 }).catch(() => {});
  });

  await step('hovering the diode shows its explanation', async () => {
    const line = editorLine(page, 'D1 ');
    const box = await line.boundingBox();
    if (!box) throw new Error('the LED line is not on screen');
    await page.mouse.move(box.x + 4, box.y + box.height / 2);
    const hover = page.locator('.monaco-hover:not(.hidden) .monaco-hover-content, .monaco-hover:not(.hidden) .hover-contents').first();
    await hover.waitFor({ state: 'visible' });
    // Both the finding under the squiggle and the server's own hover on the diode; the
    // workbench shows the first at once and adds the second when the server answers.
    const hoverText = async () => (await page.locator('.monaco-hover:not(.hidden)').first().textContent()) ?? '';
    const complete = (text) => text.includes(LED_RULE) && /\bD1\b[^]*\bdiode\b/i.test(text);
    await waitUntil(async () => complete(await hoverText()), 'the finding and the diode description in the hover').catch(async (error) => {
      throw new Error(`${error.message}; the hover reads ${JSON.stringify((await hoverText()).slice(0, 400))}`);
    });
    await shoot('03-hover.png');
    await shoot('hover-editor.png', editor);
    await page.mouse.move(5, 5);
    await page.keyboard.press('Escape');
  });

  let chosen = '';
  const menuShown = await step('Ctrl+. on the LED opens the quick-fix menu', async () => {
    await editorLine(page, 'D1 ').click({ position: { x: 4, y: 5 } });
    const items = page.locator('.action-widget .monaco-list-row');
    // Ctrl+. pressed while the workbench is still computing the line's actions shows
    // nothing at times (seen 1 run in 10 on a loaded machine): press again.
    for (let attempt = 1; attempt <= QUICK_FIX_ATTEMPTS; attempt++) {
      await page.keyboard.press('Control+Period');
      const shown = await items.first().waitFor({ timeout: attempt < QUICK_FIX_ATTEMPTS ? 10_000 : STEP_WAIT_MILLISECONDS }).then(() => true, () => false);
      if (shown) break;
      if (attempt === QUICK_FIX_ATTEMPTS) throw new Error(`no quick-fix menu after ${QUICK_FIX_ATTEMPTS} presses of Ctrl+.`);
      await page.keyboard.press('Escape');
      await editorLine(page, 'D1 ').click({ position: { x: 4, y: 5 } });
    }
    const titles = (await items.allTextContents()).map((title) => title.trim());
    const resistor = titles.find((title) => /resistor/i.test(title));
    const ignore = titles.find((title) => /ignore/i.test(title) && title.includes(LED_RULE) && /line/i.test(title)) ?? titles.find((title) => /ignore/i.test(title) && title.includes(LED_RULE));
    chosen = resistor ?? ignore ?? '';
    if (!resistor) pending.push(`no series-resistor quick fix in the menu yet (menu: ${titles.join(' | ')}); applied the ignore action instead`);
    if (!chosen) throw new Error(`neither a resistor fix nor an ignore action in the menu: ${titles.join(' | ')}`);
    await shoot('04-quick-fix-menu.png');
    await shoot('quick-fix-editor.png', editor);
  });

  if (menuShown) {
    await step(`applying "${chosen}" changes the text and clears the finding`, async () => {
      await page.locator('.action-widget .monaco-list-row').filter({ hasText: chosen }).first().click();
      await page.locator('.action-widget').waitFor({ state: 'hidden' }).catch(() => {});
      if (/resistor/i.test(chosen)) {
        // The LED no longer sits straight across the rail: a resistor line appears, and D1's line changed.
        await waitUntil(async () => /^\s*R\S*\s/im.test(await editorText(page)), 'a resistor line in the editor');
        const lines = (await editorText(page)).split('\n');
        if (lines.some((line) => line.startsWith(ledLineText))) throw new Error(`the LED still sits on its old nodes:\n${lines.join('\n')}`);
      } else {
        // product.md: `*pnlint: ignore <rule>` on the line before the element.
        await waitUntil(async () => new RegExp(`\\*pnlint: ignore ${LED_RULE}`).test(await editorText(page)), 'the ignore directive in the editor');
        const text = await editorText(page);
        const lines = text.split('\n');
        const directive = lines.findIndex((line) => line.includes(`*pnlint: ignore ${LED_RULE}`));
        if (!lines[directive + 1]?.startsWith(ledLineText)) throw new Error(`the directive is not right above the LED line:\n${text}`);
      }
      // Only this finding goes: the same LED may carry others (its dissipation, say).
      await showProblems(page);
      await waitUntil(async () => !((await page.locator('.markers-panel').first().textContent()) ?? '').includes(LED_RULE), 'the Problems panel to drop the finding');
      await shoot('05-after-fix.png');
    });
  }
  return finish();
}

/** Opens the Problems panel (Ctrl+Shift+M toggles it, so press until it shows). */
async function showProblems(page) {
  const panel = page.locator('.markers-panel').first();
  for (let attempt = 0; attempt < 3; attempt++) {
    if (await panel.isVisible()) return;
    await page.keyboard.press('Control+Shift+M');
    await panel.waitFor({ state: 'visible', timeout: 5_000 }).catch(() => {});
  }
  await panel.waitFor({ state: 'visible' });
}

async function waitUntil(probe, what, milliseconds = STEP_WAIT_MILLISECONDS) {
  const deadline = Date.now() + milliseconds;
  while (Date.now() < deadline) {
    if (await probe()) return;
    await new Promise((resolve) => setTimeout(resolve, 100));
  }
  throw new Error(`timed out waiting for ${what}`);
}
