// Reads the mail the app sent, through maildev's REST API (no shortcut around e-mail).
const api = () => process.env.PARLEY_MAIL_API!;

export interface CaughtMail {
  id: string;
  subject: string;
  text: string;
  html: string;
  to: { address: string }[];
  date: string;
}

export async function mailTo(address: string): Promise<CaughtMail[]> {
  const res = await fetch(`${api()}/api/email`);
  if (!res.ok) throw new Error(`maildev answered ${res.status}`);
  const all = (await res.json()) as CaughtMail[];
  return all
    .filter((m) => m.to.some((t) => t.address.toLowerCase() === address.toLowerCase()))
    .sort((a, b) => new Date(a.date).getTime() - new Date(b.date).getTime());
}

/** Waits for the n-th mail (1-based, counting every mail so far) to an address. */
export async function waitForMail(address: string, { count = 1, subject }: { count?: number; subject?: RegExp } = {}) {
  const until = Date.now() + 15_000;
  for (;;) {
    const mails = (await mailTo(address)).filter((m) => !subject || subject.test(m.subject));
    if (mails.length >= count) return mails[mails.length - 1];
    if (Date.now() > until) throw new Error(`no mail #${count} to ${address} within 15 s`);
    await new Promise((r) => setTimeout(r, 150));
  }
}

export async function latestSignInCode(address: string, count = 1) {
  const mail = await waitForMail(address, { count, subject: /sign-in code/ });
  const code = /(\d{6})/.exec(mail.subject)?.[1];
  if (!code) throw new Error(`no code in "${mail.subject}"`);
  return { code, mail, magicLink: /(http\S+\/sign-in\/link\S*)/.exec(mail.text)?.[1] ?? null };
}
