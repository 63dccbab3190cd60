/**
 * Child process for the "app killed in the middle of a CSV import" fault test: commits one
 * staged upload with the app's own server function, printing "committing" just before and
 * "done <imported>" after. The parent SIGKILLs it mid-transaction.
 * Usage: node --import tsx tests/helpers/fault-commit-child.ts WORKSPACE_ID USER_ID FERMENT_ID UPLOAD_ID
 */
import { commitUpload } from '../../src/server/uploads';
import { workspaceSettings } from '../../src/server/workspaces';
import { closeDb } from '../../src/db/client';
import { systemCtx } from '../../src/server/context';

const [workspaceId, userId, fermentId] = process.argv.slice(2, 5).map(Number);
const uploadId = process.argv[5]!;
const ws = await workspaceSettings(workspaceId!);
if (!ws) throw new Error('no such workspace');
process.stdout.write('committing\n');
const result = await commitUpload(systemCtx(ws, userId!), fermentId!, uploadId);
process.stdout.write(`done ${result.imported}\n`);
await closeDb();
