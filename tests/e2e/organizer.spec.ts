/**
 * The organizer's journey in the browser: create a season, upload a test piece generated here,
 * add two classes and five rules, open it, appoint a judge by an invitation read from the outbox,
 * move it to judging and final; the public rulebook then shows the rules as sentences.
 */
import { test, expect, type Page } from '@playwright/test';
import { signIn, readLatestMail, pathOfLink, demoEmail } from './helpers';
import { cylinder, toBinaryStl } from '../../scripts/fixtures/shapes';

const shot = (page: Page, name: string) => page.screenshot({ path: test.info().outputPath(`organizer-${name}.png`), fullPage: true });

test('an organizer sets up and runs a whole season', async ({ page, browser }) => {
  test.setTimeout(180_000);
  page.on('dialog', (d) => void d.accept());
  const stamp = Date.now().toString(36);
  const name = `Thaw Dash ${stamp}`;
  const slug = `thaw-dash-${stamp}`;

  await signIn(page, demoEmail('organizer'));
  await page.goto('/organize');
  await page.getByRole('link', { name: 'New season' }).click();

  // Season settings; a closing date before the opening is refused next to its field.
  await page.getByLabel('Season name').fill(name);
  await expect(page.getByLabel('Address name')).toHaveValue(slug);
  await page.getByLabel('Hosted by').fill('Millbrook Makers');
  await page.getByLabel('Time zone').fill('Europe/Berlin');
  await page.getByLabel('Opens').fill('2027-03-01T18:00');
  await page.getByLabel('Closes').fill('2027-02-01T18:00');
  await page.getByLabel('Description (Markdown)').fill('Print the **Beacon** fast and *clean*.\n\n- crisp bridge window\n- tidy overhang');
  await expect(page.getByTestId('markdown').locator('strong')).toHaveText('Beacon');
  await page.getByRole('button', { name: 'Create season' }).click();
  await expect(page.locator('#season-closesAt-error')).toContainText('close after it opens');
  await page.getByLabel('Closes').fill('2027-04-30T18:00');
  await page.getByRole('button', { name: 'Create season' }).click();
  await expect(page).toHaveURL(/\/organize\/seasons\/\d+$/);
  await expect(page.getByRole('heading', { level: 1 })).toHaveText(name);

  // Opening is refused while the season has no test piece and no class.
  await expect(page.getByTestId('transition-blockers')).toContainText('no test piece');

  // Test piece: a 64-gon cylinder (r = 10 mm, h = 20 mm) written as binary STL here.
  await page.getByLabel('Test piece name').fill('Beacon cylinder');
  await page.getByLabel('STL file').setInputFiles({ name: 'cylinder.stl', mimeType: 'model/stl', buffer: toBinaryStl(cylinder(10, 20, 64)) });
  await page.getByRole('button', { name: 'Upload test piece' }).click();
  await expect(page.getByTestId('test-piece-status')).toContainText('Test piece Beacon cylinder saved');
  await expect(page.getByTestId('test-piece')).toContainText('20.00 × 20.00 × 20.00 mm');
  // (n/2)·r²·sin(2π/n)·h = 6273.1 mm³ for the inscribed 64-gon prism (area of a regular polygon from its circumradius).
  await expect(page.getByTestId('test-piece')).toContainText('6.273 cm³');

  // Two classes.
  await page.locator('#new-class-name').fill('Compact 0.4');
  await page.locator('#new-class-nozzles').fill('0.4');
  await page.locator('#new-class-buildMax').fill('200');
  await page.getByRole('button', { name: 'Add class' }).click();
  await expect(page.getByTestId('classes-status')).toContainText('Class Compact 0.4 added');
  await page.locator('#new-class-name').fill('Wide nozzle');
  await page.locator('#new-class-nozzleMin').fill('0.6');
  await page.getByRole('button', { name: 'Add class' }).click();
  await expect(page.getByTestId('class-list').locator('li')).toHaveCount(2);

  // Five rules; a value that is not a number is refused next to it before anything is saved.
  const rules: { scope?: string; metric: string; comparator: string; value: string; valueMax?: string; tolerance?: string }[] = [
    { metric: 'walls', comparator: 'eq', value: 'two' },
    { metric: 'infill_percent', comparator: 'eq', value: '15', tolerance: '2' },
    { metric: 'layer_height_mm', comparator: 'between', value: '0.2', valueMax: '0.3' },
    { metric: 'objects', comparator: 'eq', value: '1' },
    { scope: 'Class: Wide nozzle', metric: 'layer_height_mm', comparator: 'lte', value: '0.4' },
  ];
  for (const [i, r] of rules.entries()) {
    await page.getByRole('button', { name: 'Add rule' }).click();
    const id = (k: string) => page.locator(`#rule-${i + 1}-${k}`);
    if (r.scope) await id('scope').selectOption({ label: r.scope });
    await id('metric').selectOption(r.metric);
    await id('comparator').selectOption(r.comparator);
    await id('value').fill(r.value);
    if (r.valueMax) await id('valueMax').fill(r.valueMax);
    if (r.tolerance) await id('tolerance').fill(r.tolerance);
  }
  await page.getByRole('button', { name: 'Save rulebook' }).click();
  await expect(page.locator('#rule-1-value-error')).toContainText('must be a number');
  await page.locator('#rule-1-value').fill('2');
  await expect(page.getByTestId('rule-sentence').nth(1)).toHaveText('Sparse infill must be 15 % (± 2 %).');
  await page.getByRole('button', { name: 'Save rulebook' }).click();
  await expect(page.getByTestId('rulebook-status')).toContainText('Rulebook saved: 5 rules.');
  await shot(page, 'season-ready');

  // Open it.
  await expect(page.getByTestId('transition-blockers')).toHaveCount(0);
  await page.getByRole('button', { name: 'Open for entries' }).click();
  await expect(page.getByTestId('lifecycle-status')).toContainText(`${name} is now open.`);

  // A member subscribes on the public season page and gets the next announcement.
  const fan = await browser.newContext();
  const fanPage = await fan.newPage();
  await signIn(fanPage, demoEmail('pim'));
  await fanPage.goto(`/seasons/${slug}`);
  await expect(fanPage.getByTestId('markdown').locator('li')).toHaveCount(2);
  await fanPage.getByRole('button', { name: 'Get announcements by e-mail' }).click();
  await expect(fanPage.getByRole('button', { name: 'Stop announcements' })).toBeVisible();
  await fan.close();

  // Invite a judge who has no account yet: the link asks them to sign up with that address.
  const judgeEmail = `thaw.judge.${stamp}@example.org`;
  await page.getByLabel('Judge’s e-mail').fill(judgeEmail);
  await page.getByRole('button', { name: 'Send invitation' }).click();
  await expect(page.getByTestId('judges-status')).toContainText(`Invitation sent to ${judgeEmail}`);
  await expect(page.getByTestId('invitation-list')).toContainText(judgeEmail);

  const invite = pathOfLink(await readLatestMail(browser, judgeEmail, `Invitation to judge ${name}`), '/invite');
  const ctx = await browser.newContext();
  const judge = await ctx.newPage();
  await judge.goto(invite);
  await expect(judge.getByRole('link', { name: 'Sign in to accept' })).toBeVisible();
  await judge.goto('/signup');
  await judge.getByLabel('Name shown in standings').fill('Thaw Judge');
  await judge.getByLabel('E-mail').fill(judgeEmail);
  await judge.getByLabel('Password').fill('thaw-judge-password-1');
  await judge.getByRole('button', { name: 'Create account' }).click();
  await expect(judge.getByRole('status')).toContainText('Check your inbox');
  await judge.goto(pathOfLink(await readLatestMail(browser, judgeEmail, 'Confirm your e-mail for Hotlap'), '/verify'));
  await judge.getByRole('button', { name: 'Confirm my e-mail' }).click();
  await expect(judge.getByRole('status')).toContainText('is confirmed');
  await signIn(judge, judgeEmail, 'thaw-judge-password-1');
  await judge.goto(invite);
  await judge.getByRole('button', { name: `Accept and judge ${name}` }).click();
  await expect(judge).toHaveURL(/\/judging/);
  // The new judge serves this season only.
  await expect(judge.getByText(name).first()).toBeVisible();
  await expect(judge.getByText('Frostbite Sprint')).toHaveCount(0);
  await ctx.close();

  await page.reload();
  await expect(page.getByTestId('judge-list')).toContainText('Thaw Judge');

  // Judging, then final.
  await page.getByRole('button', { name: 'Close entries and start judging' }).click();
  await expect(page.getByTestId('lifecycle-status')).toContainText(`${name} is now judging. 1 subscriber notified.`);
  expect(await readLatestMail(browser, demoEmail('pim'), `${name} is now judging`)).toContain('the judges are reviewing');
  await page.getByRole('button', { name: 'Publish final standings' }).click();
  await expect(page.getByTestId('lifecycle-status')).toContainText(`${name} is now final.`);
  await expect(page.getByRole('button', { name: 'Save rulebook' })).toHaveCount(0);
  await shot(page, 'season-final');

  // The dashboard lists it with its judge.
  await page.goto('/organize');
  const card = page.getByTestId('dashboard-season').filter({ hasText: name });
  await expect(card.getByTestId('judge-load')).toContainText('Thaw Judge');
  await expect(page.getByTestId('dashboard-season').filter({ hasText: 'Frostbite Sprint' }).getByTestId('oldest-waiting')).toBeVisible();
  await shot(page, 'dashboard');

  // The public rulebook: the same rules as plain sentences, with the safety cautions.
  await page.goto(`/seasons/${slug}/rulebook`);
  const seasonRules = page.getByTestId('rulebook-season');
  await expect(seasonRules.locator('li')).toHaveCount(4);
  for (const s of ['Walls must be 2.', 'Sparse infill must be 15 % (± 2 %).', 'Layer height must be between 0.20 and 0.30 mm.', 'Objects must be 1.'])
    await expect(seasonRules).toContainText(s);
  await expect(page.getByTestId('rulebook-class-wide-nozzle')).toContainText('Layer height must be at most 0.40 mm.');
  await expect(page.getByTestId('rulebook-class-wide-nozzle')).toContainText('replaces the season rule on layer height');
  await expect(page.getByRole('heading', { name: 'Safety first' })).toBeVisible();
  await expect(page.getByText('Never disable thermal-runaway protection')).toBeVisible();
  await shot(page, 'rulebook');
});
