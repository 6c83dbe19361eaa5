// Requests as an attacker sends them: any cookie, any source address on the loopback range.
import http from 'node:http';
import { baseUrl, Client } from '#tests/helpers/http';
import { latestSignInCode, mailTo } from '#tests/helpers/mail';

/** A Client whose requests leave from another loopback address (another "network"). */
export class ClientFrom extends Client {
  /** `headers`: sent with every request, as an attacker adds any header they like. */
  constructor(
    readonly localAddress: string,
    readonly headers: Record<string, string> = {},
  ) {
    super();
  }

  private send(method: 'GET' | 'POST', path: string, body?: string) {
    const url = new URL(path, this.base);
    return new Promise<Response>((resolve, reject) => {
      const req = http.request(
        url,
        {
          method,
          localAddress: this.localAddress,
          headers: {
            ...this.headers,
            cookie: this.cookieHeader(),
            ...(body === undefined
              ? {}
              : { 'content-type': 'application/x-www-form-urlencoded', origin: this.base, 'content-length': Buffer.byteLength(body) }),
          },
        },
        (res) => {
          const chunks: Buffer[] = [];
          res.on('data', (c: Buffer) => chunks.push(c));
          res.on('end', () => {
            const headers = new Headers();
            for (const [k, v] of Object.entries(res.headers)) {
              for (const one of Array.isArray(v) ? v : v === undefined ? [] : [v]) headers.append(k, one);
            }
            const response = new Response(res.statusCode === 204 || res.statusCode === 304 ? null : Buffer.concat(chunks), {
              status: res.statusCode,
              headers,
            });
            this.remember(response);
            resolve(response);
          });
        },
      );
      req.on('error', reject);
      if (body !== undefined) req.write(body);
      req.end();
    });
  }

  override get(path: string) {
    return this.send('GET', path);
  }

  override post(path: string, fields: Record<string, string | number>) {
    return this.send('POST', path, new URLSearchParams(Object.entries(fields).map(([k, v]) => [k, String(v)])).toString());
  }
}

/** The strategy's pending-code cookie, as the library reads it: `email=…&totp={"jwe":…}` form-encoded. */
export function totpCookie(c: Client) {
  const raw = c.cookies.get('_totp');
  if (!raw) throw new Error('no _totp cookie');
  return new URLSearchParams(raw);
}

/** Rewrites the e-mail in the pending-code cookie, as an attacker edits a cookie by hand. */
export function forgeTotpEmail(c: Client, email: string) {
  const params = totpCookie(c);
  params.set('email', email);
  c.cookies.set('_totp', params.toString());
}

/** Asks for a code and returns it with the magic link (read from maildev). */
export async function requestCode(c: Client, email: string, fields: Record<string, string> = {}) {
  const before = (await mailTo(email)).filter((m) => /sign-in code/.test(m.subject)).length;
  const res = await c.post('/sign-in', { email, ...fields });
  if (res.status !== 302) throw new Error(`code request answered ${res.status}`);
  return latestSignInCode(email, before + 1);
}

export const wrongCode = (code: string) => (code === '000000' ? '111111' : '000000');

export { baseUrl };
