import fs from 'node:fs';
import { createRequire } from 'node:module';
import type { Page } from 'playwright-core';

const require = createRequire(import.meta.url);
const AXE_SOURCE = fs.readFileSync(require.resolve('axe-core/axe.min.js'), 'utf8');

/**
 * How far the page reaches past the window's right edge, in CSS pixels (0 when nothing scrolls sideways), with the
 * deepest elements that stick out, to say where to look.
 */
export function horizontalOverflow(page: Page): Promise<{ by: number; widest: string[] }> {
  return page.evaluate(() => {
    const limit = document.documentElement.clientWidth;
    const by = Math.max(0, document.documentElement.scrollWidth - limit);
    // Content of an element that scrolls or clips sideways stays inside it, whatever its own width.
    const contained = (element: Element): boolean => {
      for (let up = element.parentElement; up && up !== document.body; up = up.parentElement) {
        if (['auto', 'scroll', 'hidden', 'clip'].includes(getComputedStyle(up).overflowX)) return true;
      }
      return false;
    };
    const sticksOut = (element: Element | null) => !!element && element.getBoundingClientRect().right > limit + 1;
    // The outermost elements that stick out: where the widening starts.
    const sticking = [...document.querySelectorAll('body *')].filter(
      (element) => sticksOut(element) && !sticksOut(element.parentElement) && !contained(element),
    );
    const widest = sticking.slice(0, 4).map((element) => {
      const classes = [...element.classList].slice(0, 2).join('.');
      const parent = element.parentElement;
      const where = `${parent?.tagName.toLowerCase()}.${[...(parent?.classList ?? [])].slice(0, 2).join('.')}`;
      return `${element.tagName.toLowerCase()}${classes ? `.${classes}` : ''} in ${where}: ${element.textContent?.slice(0, 30)}`;
    });
    return { by, widest: by > 0 ? widest : [] };
  });
}

export interface AxeFinding {
  id: string;
  impact: string;
  help: string;
  targets: string[];
}

/**
 * The serious and critical findings of axe-core (Deque's open-source WCAG checker) on the page as it stands, for
 * the WCAG 2.0/2.1 A and AA rules.
 */
export async function seriousAxeFindings(page: Page): Promise<AxeFinding[]> {
  // Evaluated through the debugging protocol: the app's Content-Security-Policy (rightly) refuses inline script tags.
  if (!(await page.evaluate(() => 'axe' in window))) await page.evaluate(AXE_SOURCE);
  // Colours are judged as people see them once boxes have faded in, not half-way through an enter transition.
  await page.evaluate(() =>
    Promise.all(document.getAnimations().map((animation) => animation.finished.catch(() => null))),
  );
  return page.evaluate(async () => {
    const axe = (window as unknown as { axe: typeof import('axe-core') }).axe;
    const result = await axe.run(document, {
      runOnly: { type: 'tag', values: ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa'] },
    });
    return result.violations
      .filter((violation) => violation.impact === 'serious' || violation.impact === 'critical')
      .map((violation) => ({
        id: violation.id,
        impact: violation.impact ?? '',
        help: violation.help,
        targets: violation.nodes.slice(0, 5).map((node) => `${node.target.join(' ')}: ${node.failureSummary ?? ''}`),
      }));
  });
}
