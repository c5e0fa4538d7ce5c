import type { Role } from "#shared/schemas/common.ts";

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    interface User {
      id: number;
      email: string;
      name: string;
      role: Role;
    }
  }
}

declare module "express-session" {
  interface SessionData {
    signedInAt?: number;
  }
}

/** Who is asking, as the services see it: no request objects below the routers. */
export interface Actor {
  user: Express.User | null;
  ip: string | null;
}

export {};
