// Optical astrometry of an object (issue 8): list, upload ADES PSV (multipart field `file`, or JSON
// {fileName, text}), exclude an observation by hand. A refused file answers
// 422 {error: {code: 'INVALID_ASTROMETRY', message, issues, details: {issues}}} and nothing is stored.
import { Router, type ErrorRequestHandler } from 'express';
import { z } from 'zod';
import { idParamsSchema } from '../../shared/schemas/api';
import { updateObservationBodySchema, uploadAstrometryBodySchema } from '../../shared/schemas/odApi';
import { singleFileUpload } from '../middleware/upload';
import { handle, parseRequest } from '../middleware/validate';
import type { Services } from '../services';
import { AstrometryRefusedError, astrometryTextOfUpload, MAX_ASTROMETRY_FILE_BYTES } from '../services/od/astrometry';

const observationParamsSchema = z.object({ id: z.coerce.number().int().positive(), obsId: z.coerce.number().int().positive() });

/** Multipart upload of one file in field `file`; refusals become INVALID_ASTROMETRY. */
const singleAstrometryFile = () =>
  singleFileUpload({
    limits: { fileSize: MAX_ASTROMETRY_FILE_BYTES, fields: 5, fieldSize: 1024 },
    messages: {
      tooLarge: `The file is larger than ${MAX_ASTROMETRY_FILE_BYTES / 1_000_000} MB`,
      unexpectedField: (field) => `Send the ADES file in the multipart field "file" (got "${field}")`,
      tooManyFiles: 'Send one file at a time',
    },
    refuse: (message) => new AstrometryRefusedError([{ line: 0, field: null, message }]),
  });

/** The contract's body of a refused file: the issues beside the message (and in details, the API's usual place). */
const refusedFileAnswer: ErrorRequestHandler = (err, _req, res, next) => {
  if (!(err instanceof AstrometryRefusedError) || res.headersSent) return next(err);
  res.status(422).json({ error: { code: 'INVALID_ASTROMETRY', message: err.message, issues: err.issues, details: { issues: err.issues } } });
};

export function astrometryRouter({ astrometry }: Services): Router {
  const router = Router();
  router.get('/objects/:id/astrometry', handle({ params: idParamsSchema }, ({ params }) => astrometry.list(params.id)));
  router.post(
    '/objects/:id/astrometry',
    singleAstrometryFile(),
    handle(
      { params: idParamsSchema },
      ({ params, req }) => {
        if (req.is('multipart/form-data')) {
          if (!req.file) throw new AstrometryRefusedError([{ line: 0, field: null, message: 'No file: send the ADES file in the multipart field "file"' }]);
          const fileName = req.file.originalname ? req.file.originalname.slice(0, 200) : null;
          return astrometry.upload(params.id, { fileName, text: astrometryTextOfUpload(req.file.buffer) }, req.user!.id);
        }
        const { body } = parseRequest(req, { body: uploadAstrometryBodySchema });
        return astrometry.upload(params.id, { fileName: body.fileName || null, text: body.text }, req.user!.id);
      },
      { status: 201 },
    ),
  );
  router.patch(
    '/objects/:id/astrometry/:obsId',
    handle({ params: observationParamsSchema, body: updateObservationBodySchema }, ({ params, body, req }) => astrometry.setExcluded(params.id, params.obsId, body, req.user!.id)),
  );
  router.use(refusedFileAnswer);
  return router;
}
