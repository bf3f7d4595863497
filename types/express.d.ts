import type { Role } from "@/schemas/account";

declare global {
  namespace Express {
    interface User {
      id: string;
      email: string;
      displayName: string;
      role: Role;
    }
    interface Request {
      /** The signed-in user (session cookie or API token); absent for anonymous requests. */
      user?: User;
      /** How the request authenticated; absent for anonymous requests. */
      auth?: { via: "session" | "token"; scope: "read" | "write"; tokenId?: string };
      /** The browser of a valid web-app cookie (server/auth/app-cookie.ts); absent otherwise. */
      appBrowser?: { id: string; expiresAt: number };
    }
  }
}
export {};
