import type { Browser, BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import type { ReceivedMail } from '../../server/mail/smtp-fake.js';
import { launchChromium, newSignedOutPage, screenshot, watchForPageErrors } from './browser.js';
import { startSolverProcess } from './solver-process.js';

// The seeded demo workspace (server/seed/demo-workspace.ts): its engineer and reviewer in the terminal project.
const ENGINEER = { username: 'engineer', password: 'proofline-engineer' };
const REVIEWER = { username: 'reviewer', password: 'proofline-reviewer' };
const ADMIN = { username: 'admin', password: 'proofline-admin' };
const DEMO_PROJECT = 'Brackwater Point Gas Terminal: export compression';

/** An invented 1oo2 pair of pressure switches on a fictional scrubber (rates per hour). */
const MODEL = {
  format: 'proofline/model',
  version: 1,
  name: 'Scrubber S-410 high pressure, 1oo2',
  kind: 'fault-tree',
  mission: { hours: 87_600, demand: 'low' },
  events: [
    { id: 'PSH-A', label: 'Pressure switch A', lambdaDU: 2.0e-7, proofTest: { intervalHours: 8760 } },
    { id: 'PSH-B', label: 'Pressure switch B', lambdaDU: 2.0e-7, proofTest: { intervalHours: 8760 } },
  ],
  gates: [{ id: 'TOP', label: 'Both switches fail', type: 'and', inputs: ['PSH-A', 'PSH-B'] }],
  top: 'TOP',
  layout: { TOP: { x: 200, y: 40 }, 'PSH-A': { x: 80, y: 200 }, 'PSH-B': { x: 320, y: 200 } },
};

async function signIn(page: Page, user: { username: string; password: string }): Promise<void> {
  await page.goto(`${inject('baseUrl')}/projects`);
  await page.waitForURL(/\/sign-in/);
  await page.getByLabel('Username').fill(user.username);
  await page.getByLabel('Password').fill(user.password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  try {
    await page.waitForURL(/\/projects$/);
  } catch (error) {
    await screenshot(page, `review-sign-in-${user.username}`);
    throw error;
  }
}

async function api<T>(page: Page, method: 'get' | 'post', path: string, data?: unknown): Promise<T> {
  const response = method === 'get' ? await page.request.get(`${inject('baseUrl')}${path}`) : await page.request.post(`${inject('baseUrl')}${path}`, { data });
  if (!response.ok()) throw new Error(`${method} ${path}: ${response.status()} ${await response.text()}`);
  return (await response.json()) as T;
}

describe('peer review in the browser', () => {
  let browser: Browser;
  const contexts: BrowserContext[] = [];

  beforeAll(async () => {
    browser = await launchChromium();
  });

  afterAll(async () => {
    for (const context of contexts) await context.close();
    await browser?.close();
  });

  async function open(user: { username: string; password: string }): Promise<{ page: Page; errors: string[] }> {
    const { context, page } = await newSignedOutPage(browser);
    contexts.push(context);
    const errors = watchForPageErrors(page);
    await signIn(page, user);
    return { page, errors };
  }

  it('the engineer requests review, the reviewer annotates a gate and returns it, the engineer resolves and re-issues, the reviewer approves', async () => {
    const engineer = await open(ENGINEER);
    // Own SIF and model, so the test neither depends on nor changes what other tests use.
    const projects = await api<{ id: string; name: string }[]>(engineer.page, 'get', '/api/projects');
    const project = projects.find((item) => item.name === DEMO_PROJECT)!;
    expect(project).toBeDefined();
    const tag = `PSZ-${Date.now() % 100_000}`;
    const sif = await api<{ id: string }>(engineer.page, 'post', `/api/projects/${project.id}/sifs`, {
      tag,
      title: 'Scrubber high pressure trip',
      hazardousEvent: 'Overpressure of the scrubber.',
      demandMode: 'low',
      target: { kind: 'sil', value: 2 },
      demandRatePerYear: 0.1,
      missionHours: 87_600,
    });
    const model = await api<{ id: string; draftVersion: number }>(engineer.page, 'post', `/api/projects/${project.id}/sifs/${sif.id}/models`, { file: MODEL });
    await api(engineer.page, 'post', `/api/projects/${project.id}/models/${model.id}/revisions`, { draftVersion: model.draftVersion, reason: 'First issue' });
    const editorUrl = `${inject('baseUrl')}/projects/${project.id}/sifs/${sif.id}/models/${model.id}`;

    // 1. The engineer asks the reviewer for a review.
    await engineer.page.goto(editorUrl);
    await engineer.page.getByRole('button', { name: 'Review', exact: true }).click();
    const request = engineer.page.getByRole('form', { name: 'Request review' });
    await request.getByLabel(/Rhea Reviewer/).check();
    await request.getByLabel('Message').fill('Please check the voting of the two switches.');
    await request.getByRole('button', { name: 'Request review' }).click();
    await expect.poll(() => engineer.page.locator('[data-review-round]').getAttribute('data-status')).toBe('open');

    // 2. The reviewer finds it in the queue, annotates gate TOP (must fix) and returns the revision.
    const reviewer = await open(REVIEWER);
    await reviewer.page.goto(`${inject('baseUrl')}/reviews`);
    await reviewer.page.locator('[data-queue-round]').filter({ hasText: tag }).getByRole('link').click();
    await reviewer.page.waitForURL(/\/models\//);
    await reviewer.page.getByRole('button', { name: 'Review', exact: true }).click();
    const annotate = reviewer.page.getByRole('form', { name: 'New annotation' });
    await annotate.getByLabel('Pin to').selectOption('gate:TOP');
    await annotate.getByLabel('Severity').selectOption('must-fix');
    await annotate.getByLabel('Comment').fill('No common-cause group on the two switches.');
    await annotate.getByRole('button', { name: 'Add annotation' }).click();
    await reviewer.page.locator('[data-annotation="TOP"][data-status="open"]').waitFor();
    // The gate carries a pin marker on the canvas: one thread, coloured by the open must-fix.
    const pin = reviewer.page.locator('[data-node="gate:TOP"] [data-pin="gate:TOP"]');
    await expect.poll(() => pin.getAttribute('data-severity')).toBe('must-fix');
    expect((await pin.innerText()).trim()).toBe('1');
    await expect.poll(() => reviewer.page.locator('[data-pin]').count()).toBe(1);
    await screenshot(reviewer.page, 'review-annotated');
    await reviewer.page.getByLabel('Decision comment').fill('See the must-fix on TOP.');
    await reviewer.page.getByRole('button', { name: 'Return with comments' }).click();
    await expect.poll(() => reviewer.page.locator('[data-review-round]').getAttribute('data-status')).toBe('returned');

    // 3. The engineer opens the thread from the gate's pin, resolves it, issues revision 2 and asks again.
    await engineer.page.reload();
    await engineer.page.locator('[data-pin="gate:TOP"]').click();
    await engineer.page.locator('[data-annotation="TOP"].open').getByRole('button', { name: 'Resolve' }).click();
    await engineer.page.locator('[data-annotation="TOP"][data-status="resolved"]').waitFor();
    await expect.poll(() => engineer.page.locator('[data-pin="gate:TOP"]').getAttribute('data-severity')).toBe('resolved');
    await engineer.page.getByRole('button', { name: 'Issue revision' }).click();
    await engineer.page.getByLabel('Reason for the revision').fill('Answer to the review');
    await engineer.page.getByRole('dialog').getByRole('button', { name: 'Issue revision' }).click();
    const again = engineer.page.getByRole('form', { name: 'Request review' });
    await again.getByText('Ask for a review of revision 2').waitFor();
    await again.getByLabel(/Rhea Reviewer/).check();
    await again.getByRole('button', { name: 'Request review' }).click();
    await expect.poll(() => engineer.page.locator('[data-review-round]').getAttribute('data-status')).toBe('open');

    // 4. The reviewer approves revision 2.
    await reviewer.page.reload();
    await reviewer.page.getByRole('button', { name: /^Review/ }).click();
    await reviewer.page.getByRole('button', { name: 'Approve' }).click();
    await expect.poll(() => reviewer.page.locator('[data-review-round]').getAttribute('data-status')).toBe('approved');
    const status = await api<{ status: string }>(reviewer.page, 'get', `/api/projects/${project.id}/sifs/${sif.id}`);
    expect(status.status).toBe('approved');

    // 5. The test's SMTP server, which the app was configured to use as its real host, received the three
    // kinds of notice: review requested (twice), comment on your model, returned and approved.
    const domain = inject('mailDomain');
    const received = async () => {
      const reply = await fetch(inject('mailInboxUrl'));
      return ((await reply.json()) as ReceivedMail[]).filter((mail) => mail.raw.includes(tag) || mail.subject.includes(MODEL.name));
    };
    await expect.poll(async () => (await received()).length).toBeGreaterThanOrEqual(5);
    const mails = (await received()).map((mail) => ({ to: mail.to.join(','), subject: mail.subject, from: mail.from }));
    expect(mails.filter((mail) => mail.subject.startsWith(`[Proofline] Review requested: ${tag}`)).map((mail) => mail.to)).toEqual([`reviewer@${domain}`, `reviewer@${domain}`]);
    expect(mails.filter((mail) => mail.subject.includes(`commented on ${MODEL.name} revision 1`)).map((mail) => mail.to)).toEqual([`engineer@${domain}`]);
    expect(mails.filter((mail) => mail.subject.includes(`${tag} ${MODEL.name} revision 1 returned by`)).map((mail) => mail.to)).toEqual([`engineer@${domain}`]);
    expect(mails.filter((mail) => mail.subject.includes(`${tag} ${MODEL.name} revision 2 approved by`)).map((mail) => mail.to)).toEqual([`engineer@${domain}`]);
    expect(mails).toHaveLength(5);
    expect(new Set(mails.map((mail) => mail.from))).toEqual(new Set(['proofline@localhost']));

    // The admin's list shows the same notices as accepted by the host.
    const admin = await open(ADMIN);
    await admin.page.goto(`${inject('baseUrl')}/admin/mail`);
    const rows = admin.page.locator('[data-sent-mail]').filter({ hasText: tag });
    await expect.poll(() => rows.count()).toBeGreaterThanOrEqual(4);
    const texts = await rows.allInnerTexts();
    expect(texts.filter((text) => text.includes('review-requested') && text.includes(`reviewer@${domain}`))).toHaveLength(2);
    expect(texts.filter((text) => text.includes('review-returned') && text.includes(`engineer@${domain}`))).toHaveLength(1);
    expect(texts.filter((text) => text.includes('review-approved') && text.includes(`engineer@${domain}`))).toHaveLength(1);
    expect(texts.every((text) => text.includes('accepted'))).toBe(true);
    await screenshot(admin.page, 'review-sent-mail');

    expect([...engineer.errors, ...reviewer.errors, ...admin.errors]).toEqual([]);
  });

  it('the reviewer comments on the PFD(t) chart of a solved revision; the author sees it on the results page and in the review panel, answers and resolves it', async () => {
    const solver = startSolverProcess();
    try {
      const engineer = await open(ENGINEER);
      const projects = await api<{ id: string; name: string }[]>(engineer.page, 'get', '/api/projects');
      const project = projects.find((item) => item.name === DEMO_PROJECT)!;
      const tag = `PSF-${Date.now() % 100_000}`;
      const sif = await api<{ id: string }>(engineer.page, 'post', `/api/projects/${project.id}/sifs`, {
        tag,
        title: 'Knock-out drum high level trip',
        hazardousEvent: 'Liquid carry-over into the compressor.',
        demandMode: 'low',
        target: { kind: 'sil', value: 2 },
        demandRatePerYear: 0.1,
        missionHours: 87_600,
      });
      const file = { ...MODEL, name: 'Knock-out drum D-520 high level, 1oo2' };
      const model = await api<{ id: string; draftVersion: number }>(engineer.page, 'post', `/api/projects/${project.id}/sifs/${sif.id}/models`, { file });
      await api(engineer.page, 'post', `/api/projects/${project.id}/models/${model.id}/revisions`, { draftVersion: model.draftVersion, reason: 'First issue' });
      const started = await api<{ id: string }>(engineer.page, 'post', `/api/projects/${project.id}/models/${model.id}/solves`, { source: { kind: 'revision', number: 1 }, settings: { method: 'exact', timePoints: 500 } });
      await expect.poll(async () => (await api<{ status: string }>(engineer.page, 'get', `/api/projects/${project.id}/solves/${started.id}`)).status, { timeout: 120_000 }).toBe('succeeded');
      const resultsUrl = `${inject('baseUrl')}/projects/${project.id}/sifs/${sif.id}/models/${model.id}/results/${started.id}`;

      // 1. The reviewer opens the results of revision 1 and asks a question on the PFD(t) chart.
      const reviewer = await open(REVIEWER);
      await reviewer.page.goto(resultsUrl);
      const reviewerPin = reviewer.page.locator('[data-figure-pin="pfd-curve"]');
      await expect.poll(() => reviewerPin.innerText()).toContain('0');
      await reviewerPin.click();
      const reviewerThreads = reviewer.page.locator('[data-figure-threads="pfd-curve"]');
      const form = reviewerThreads.getByRole('form', { name: 'New comment on PFD(t) chart' });
      await form.getByLabel('Severity').selectOption('question');
      await form.getByLabel('Comment').fill('Is the proof test taken as perfect (full coverage)?');
      await form.getByRole('button', { name: 'Add comment' }).click();
      await reviewerThreads.locator('[data-figure-thread][data-status="open"]').waitFor();
      await expect.poll(() => reviewerPin.getAttribute('data-severity')).toBe('question');
      expect((await reviewerPin.locator('.count').innerText()).trim()).toBe('1');
      await screenshot(reviewer.page, 'review-figure-comment');

      // 2. The engineer, the model's author, sees the marker on the same figure, reads and answers the question.
      await engineer.page.goto(resultsUrl);
      const engineerPin = engineer.page.locator('[data-figure-pin="pfd-curve"]');
      await expect.poll(() => engineerPin.getAttribute('data-severity')).toBe('question');
      expect(await engineer.page.locator('[data-figure-comments-note]').innerText()).toContain('1 review comment on the figures, 1 open');
      await engineerPin.click();
      const thread = engineer.page.locator('[data-figure-threads="pfd-curve"] [data-figure-thread]');
      expect(await thread.locator('.body').innerText()).toContain('Is the proof test taken as perfect (full coverage)?');
      await thread.getByLabel('Reply').fill('Yes: coverage 100 %, stated in the assumptions.');
      await thread.getByRole('button', { name: 'Reply' }).click();
      await expect.poll(() => thread.locator('.reply').allInnerTexts()).toEqual([expect.stringContaining('Yes: coverage 100 %, stated in the assumptions.')]);
      await thread.getByRole('button', { name: 'Resolve' }).click();
      await expect.poll(() => thread.getAttribute('data-status')).toBe('resolved');
      await expect.poll(() => engineerPin.getAttribute('data-severity')).toBe('resolved');

      // 3. The review panel beside the canvas lists it by its figure and leads back to it.
      await engineer.page.goto(`${inject('baseUrl')}/projects/${project.id}/sifs/${sif.id}/models/${model.id}`);
      await engineer.page.getByRole('button', { name: /^Review/ }).click();
      const listed = engineer.page.locator('[data-annotation="pfd-curve"]');
      expect(await listed.locator('.thread-head').innerText()).toContain('result figure PFD(t) chart');
      await listed.locator('.thread-head').click();
      await listed.locator('[data-results-link]').click();
      await engineer.page.waitForURL(/\/results\/[0-9a-f-]+\?figure=pfd-curve$/);
      await engineer.page.locator('[data-figure-threads="pfd-curve"] [data-figure-thread][data-status="resolved"]').waitFor();

      // 4. The comment reached the author by mail, and the answer reached the reviewer.
      const domain = inject('mailDomain');
      const received = async () => {
        const reply = await fetch(inject('mailInboxUrl'));
        return ((await reply.json()) as ReceivedMail[]).filter((mail) => mail.subject.includes(file.name));
      };
      await expect.poll(async () => (await received()).length).toBe(2);
      const mails = await received();
      const comment = mails.find((mail) => mail.subject.includes(`commented on ${file.name} revision 1`));
      expect(comment?.to).toEqual([`engineer@${domain}`]);
      expect(comment?.raw).toContain('question on result figure PFD(t) chart');
      expect(mails.find((mail) => mail.subject.includes(`replied to your annotation on ${file.name}`))?.to).toEqual([`reviewer@${domain}`]);

      expect([...engineer.errors, ...reviewer.errors]).toEqual([]);
    } finally {
      solver.kill('SIGTERM');
    }
  });
});
