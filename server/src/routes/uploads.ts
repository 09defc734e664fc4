import { z } from 'zod';
import { idSchema } from '@shared/schemas/common';
import { Api, siteOfRow } from '../http';
import { sendUpload } from '../services/uploads';

/** Any stored file, to members of its site (and administrators); files kept outside the web root. */
export function registerUploadRoutes(api: Api): void {
  api.route(
    {
      method: 'get',
      path: '/api/uploads/:id',
      summary: 'A stored file (drawing, photo, attachment), to members of its site',
      tag: 'Files',
      access: {
        kind: 'site',
        roles: 'any',
        admin: true,
        siteId: siteOfRow('uploads'),
      },
      params: z.object({ id: idSchema }),
      produces: 'application/octet-stream',
    },
    async ({ params, res, deps }) => {
      await sendUpload(deps, res, params.id);
    },
  );
}
