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
      /** How the request authenticated; absent for anonymous requests. */
      auth?: { via: "session" | "token"; scope: "read" | "write"; tokenId?: string };
    }
  }
}
export {};
