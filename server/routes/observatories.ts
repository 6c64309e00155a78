// The office's observatory table (issue 8). Bodies are checked by the service with observatorySchema (422 with
// zod's messages, as the contract of issue 8 asks, rather than the generic 400).
import { Router } from 'express';
import { z } from 'zod';
import { observatoryCodeSchema } from '../../shared/schemas/od';
import { importObservatoriesBodySchema, importObservatoriesFieldsSchema, MAX_OBSERVATORY_FILE_BYTES } from '../../shared/schemas/odApi';
import { singleFileUpload } from '../middleware/upload';
import { handle, parseRequest } from '../middleware/validate';
import type { Services } from '../services';
import { observatoryFileRefused, observatoryTextOfUpload, parseObservatory } from '../services/od/observatories';

const codeParamsSchema = z.object({ code: observatoryCodeSchema });

const fileIssue = (message: string) => observatoryFileRefused([{ entry: null, code: null, field: null, kind: 'invalid', message }]);

/** Multipart import of one file in field `file` (plus `mode`); refusals become the import's 422 with a file issue. */
const singleObservatoryFile = () =>
  singleFileUpload({
    limits: { fileSize: MAX_OBSERVATORY_FILE_BYTES, fields: 3, fieldSize: 1024 },
    messages: {
      tooLarge: `The file is larger than ${MAX_OBSERVATORY_FILE_BYTES / 1000} kB`,
      unexpectedField: (field) => `Send the observatory file in the multipart field "file" (got "${field}")`,
      tooManyFiles: 'Send one file at a time',
    },
    refuse: fileIssue,
  });

export function observatoriesRouter({ observatories }: Services): Router {
  const router = Router();
  router.get('/observatories', handle({}, () => observatories.list()));
  router.post('/observatories', handle({}, ({ req }) => observatories.create(parseObservatory(req.body), req.user!.id), { status: 201 }));
  // Import a file in the CLI's form (multipart field `file` or JSON {fileName, text}; `mode` add-only or replace).
  router.post(
    '/observatories/import',
    singleObservatoryFile(),
    handle({}, ({ req }) => {
      if (req.is('multipart/form-data')) {
        const { body: fields } = parseRequest(req, { body: importObservatoriesFieldsSchema });
        if (!req.file) throw fileIssue('No file: send the observatory file in the multipart field "file"');
        const fileName = req.file.originalname ? req.file.originalname.slice(0, 200) : null;
        return observatories.importFile({ fileName, text: observatoryTextOfUpload(req.file.buffer), mode: fields.mode }, req.user!.id);
      }
      const { body } = parseRequest(req, { body: importObservatoriesBodySchema });
      return observatories.importFile({ fileName: body.fileName || null, text: body.text, mode: body.mode }, req.user!.id);
    }),
  );
  router.put('/observatories/:code', handle({ params: codeParamsSchema }, ({ params, req }) => observatories.update(params.code, parseObservatory(req.body), req.user!.id)));
  router.delete('/observatories/:code', handle({ params: codeParamsSchema }, ({ params }) => observatories.remove(params.code)));
  return router;
}
