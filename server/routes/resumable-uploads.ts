import { Router, type RequestHandler } from 'express';
import { uploadIdParamSchema } from '../../shared/schemas/params';
import { requireRole } from '../middlewares/auth';
import { resumableUploadEngine, type ResumableUploadOptions } from '../middlewares/upload-engine-resumable';
import { validated } from '../middlewares/validate';

/** Where resumable uploads live (routes/index.ts mounts this router there); `POST /api/clips` stays for scripts. */
export const RESUMABLE_UPLOADS_ROUTE = '/api/clips/resumable';

/**
 * `/api/clips/resumable`: tus creation (POST), then HEAD for the offset, PATCH for the bytes from there and
 * DELETE to give up, on `/:uploadId`. The final PATCH answers with the new clip.
 */
export function createResumableUploadsRouter(options: Omit<ResumableUploadOptions, 'route'>): Router {
  const engine = resumableUploadEngine({ ...options, route: RESUMABLE_UPLOADS_ROUTE });
  const onUpload: RequestHandler = validated({ params: uploadIdParamSchema }, (_input, req, res, next) => {
    void engine(req, res, next);
  });
  const router = Router();
  router.post('/', requireRole('operator'), engine);
  router.head('/:uploadId', requireRole('operator'), onUpload);
  router.patch('/:uploadId', requireRole('operator'), onUpload);
  router.delete('/:uploadId', requireRole('operator'), onUpload);
  return router;
}
