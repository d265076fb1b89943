import { TEST_PASSWORD } from './test-server';

/** Cookie jar of one: merges Set-Cookie answers into a Cookie header. */
function mergeCookies(current: string, response: Response): string {
  const jar = new Map(
    current
      .split('; ')
      .filter(Boolean)
      .map((pair) => pair.split('=') as [string, string]),
  );
  for (const cookie of response.headers.getSetCookie()) {
    const [pair] = cookie.split(';');
    const [name, ...value] = pair!.split('=');
    jar.set(name!, value.join('='));
  }
  return [...jar].map(([name, value]) => `${name}=${value}`).join('; ');
}

/** Signs in over real HTTP, for tests that need raw sockets (cut connections, concurrent uploads). */
export async function signInOverHttp(baseUrl: string, email: string): Promise<{ cookie: string; csrf: string }> {
  let cookie = '';
  const first = await fetch(`${baseUrl}/api/auth/csrf`);
  cookie = mergeCookies(cookie, first);
  const signIn = await fetch(`${baseUrl}/api/auth/sign-in`, {
    method: 'POST',
    headers: {
      cookie,
      'content-type': 'application/json',
      'x-csrf-token': ((await first.json()) as { token: string }).token,
    },
    body: JSON.stringify({ email, password: TEST_PASSWORD }),
  });
  if (!signIn.ok) throw new Error(`sign-in failed: ${signIn.status}`);
  cookie = mergeCookies(cookie, signIn);
  const second = await fetch(`${baseUrl}/api/auth/csrf`, { headers: { cookie } });
  cookie = mergeCookies(cookie, second);
  return { cookie, csrf: ((await second.json()) as { token: string }).token };
}
