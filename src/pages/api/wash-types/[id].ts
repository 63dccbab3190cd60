import { route, json, idParam, nonEmpty } from '../../../server/http';
import { updateWashType } from '../../../server/vessels';
import { washTypeBody } from './index';

export const PATCH = route({ action: 'washtypes.manage', body: nonEmpty(washTypeBody.partial()) }, async ({ auth, body, params }) =>
  json({ washType: await updateWashType(auth.workspaceId, auth.userId, idParam(params.id), body) }));
