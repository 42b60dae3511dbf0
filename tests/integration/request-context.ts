/** A cookie as the server set it, with the options it asked for. */
export interface JarCookie {
  name: string;
  value: string;
  options: Record<string, unknown>;
}

/**
 * The in-memory stand-in for one browser: the cookies the server set and the headers of the
 * next request. Reset between tests; swap `jar` to act as a second browser holding an old cookie.
 */
class RequestContext {
  jar = new Map<string, JarCookie>();
  requestHeaders = new Headers({ "user-agent": "vitest", "x-forwarded-for": "127.0.0.1" });

  reset(ip = "127.0.0.1") {
    this.jar = new Map();
    this.requestHeaders = new Headers({ "user-agent": "vitest", "x-forwarded-for": ip });
  }

  cookieStore() {
    const jar = this.jar;
    return {
      get: (name: string) => {
        const c = jar.get(name);
        return c ? { name, value: c.value } : undefined;
      },
      getAll: () => [...jar.values()].map((c) => ({ name: c.name, value: c.value })),
      has: (name: string) => jar.has(name),
      set: (name: string, value: string, options: Record<string, unknown> = {}) => {
        jar.set(name, { name, value, options });
      },
      delete: (name: string) => {
        jar.delete(name);
      },
    };
  }

  headers() {
    return this.requestHeaders;
  }

  /** Copies the jar, to replay later as a stolen or kept cookie. */
  snapshot(): Map<string, JarCookie> {
    return new Map([...this.jar].map(([k, v]) => [k, { ...v }]));
  }

  restore(jar: Map<string, JarCookie>) {
    this.jar = new Map([...jar].map(([k, v]) => [k, { ...v }]));
  }
}

export const requestContext = new RequestContext();
