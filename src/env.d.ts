/// <reference types="astro/client" />

declare namespace App {
  interface Locals {
    user: { id: number; email: string; name: string } | null;
    sessionId: string | null;
    workspace: import('./server/workspaces').WorkspaceSettings | null;
    role: import('./db/schema').Role | null;
    memberships: Array<{ workspaceId: number; name: string; role: import('./db/schema').Role }>;
    cspNonce?: string;
  }
}
