import type { Browser } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DESKTOP, launch, newContext, pageErrors, PHONE, signedInPage, signInInBrowser } from '#tests/helpers/browser';
import { uniqueEmail } from '#tests/helpers/http';
import { waitForMail } from '#tests/helpers/mail';

let browser: Browser;
beforeAll(async () => {
  browser = await launch();
});
afterAll(async () => {
  await browser?.close();
});

describe('foundation, in Chromium', () => {
  it('the demo instructor signs in, creates a course, invites an assistant who accepts and has assistant rights', async () => {
    const instructor = await (await newContext(browser, DESKTOP)).newPage();
    await instructor.goto('/');
    await instructor.getByRole('link', { name: 'Sign in' }).click();
    await signInInBrowser(instructor, 'r.okafor@halvorsen.example');
    await expect.poll(() => instructor.url()).toMatch(/\/courses$/);
    await expect.poll(() => instructor.getByRole('link', { name: 'ECON 214 Strategy and Markets' }).isVisible()).toBe(true);

    await instructor.getByRole('link', { name: 'New course' }).click();
    await instructor.getByRole('button', { name: 'Create course' }).click();
    await expect.poll(() => instructor.getByText('Give the course a title of at least 3 characters.').isVisible()).toBe(true);
    await instructor.getByLabel('Title').fill('ECON 390 Seminar in Cooperation');
    await instructor.getByLabel('Term').fill('Fall 2027');
    await instructor.getByRole('button', { name: 'Create course' }).click();
    await expect.poll(() => instructor.getByRole('heading', { name: 'ECON 390 Seminar in Cooperation' }).isVisible()).toBe(true);

    await instructor.getByRole('link', { name: 'Members' }).click();
    const assistantEmail = uniqueEmail('ta');
    await instructor.getByLabel('E-mail address').fill(assistantEmail);
    await instructor.getByLabel('Role', { exact: true }).selectOption('assistant');
    await instructor.getByRole('button', { name: 'Send invitation' }).click();
    await expect.poll(() => instructor.getByText(`Invitation sent to ${assistantEmail}.`).isVisible()).toBe(true);
    await expect.poll(() => instructor.getByText('Pending invitations').isVisible()).toBe(true);

    const mail = await waitForMail(assistantEmail, { subject: /Invitation to ECON 390/ });
    const link = /(http\S+\/invitations\/\S+)/.exec(mail.text)![1];
    const ta = await (await newContext(browser, PHONE)).newPage();
    await ta.goto(link);
    await ta.getByRole('link', { name: 'Sign in to accept' }).click();
    await signInInBrowser(ta, assistantEmail);
    await expect.poll(() => ta.url()).toContain('/invitations/');
    await ta.getByRole('button', { name: 'Accept and join' }).click();
    await expect.poll(() => ta.getByRole('heading', { name: 'ECON 390 Seminar in Cooperation' }).isVisible()).toBe(true);
    await expect.poll(() => ta.getByText('Your role: Assistant').isVisible()).toBe(true);
    await ta.getByRole('link', { name: 'Members' }).click();
    await expect.poll(() => ta.getByRole('table', { name: 'Course members' }).isVisible()).toBe(true);
    // Assistants see the roster but cannot invite or change roles.
    expect(await ta.getByRole('button', { name: 'Send invitation' }).count()).toBe(0);
    expect(await ta.getByRole('button', { name: /^Remove/ }).count()).toBe(0);

    // The instructor sees the new member after a reload, and the table sorts and filters.
    await instructor.reload();
    const table = instructor.getByRole('table', { name: 'Course members' });
    await expect.poll(() => table.locator('tbody tr', { hasText: assistantEmail }).count()).toBe(1);
    await instructor.getByLabel('Filter members').fill('tests.parley');
    await expect.poll(() => table.locator('tbody tr').count()).toBe(1);
    expect(pageErrors).toEqual([]);
  });

  it('a participant signs in on a 390×844 phone and gets 403 on staff pages', async () => {
    const phone = await signedInPage(browser, 'student01@halvorsen.example', PHONE);
    await expect.poll(() => phone.getByRole('heading', { name: 'Your courses' }).isVisible()).toBe(true);
    // exact: the course's leagues below name the course too
    await expect.poll(() => phone.getByText('ECON 214 Strategy and Markets', { exact: true }).isVisible()).toBe(true);
    // One thumb: the page does not scroll sideways.
    const overflow = await phone.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
    expect(overflow).toBeLessThanOrEqual(0);

    const res = await phone.goto('/courses/1');
    expect(res?.status()).toBe(403);
    await expect.poll(() => phone.getByRole('heading', { name: 'Not for your role' }).isVisible()).toBe(true);
    const members = await phone.goto('/courses/1/members');
    expect(members?.status()).toBe(403);
    expect(pageErrors).toEqual([]);
  });
});
