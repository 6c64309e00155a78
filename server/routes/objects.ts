import { Router } from 'express';
import { idParamsSchema } from '../../shared/schemas/api';
import {
  compareQuerySchema,
  createObjectBodySchema,
  objectListQuerySchema,
  solutionFormBodySchema,
  solutionParamsSchema,
  solutionUploadFieldsSchema,
  updateObjectBodySchema,
  type SolutionListResponse,
} from '../../shared/schemas/objects';
import { unprocessable } from '../errors';
import { singleFileUpload } from '../middleware/upload';
import { handle, parseRequest } from '../middleware/validate';
import type { Services } from '../services';
import { MAX_SOLUTION_FILE_BYTES, textOfUpload } from '../services/objects';

/** Multipart upload of one file in field `file`; refusals become 422 with issues. */
const singleSolutionFile = () =>
  singleFileUpload({
    limits: { fileSize: MAX_SOLUTION_FILE_BYTES, fields: 10, fieldSize: 4096 },
    messages: {
      tooLarge: `the file is larger than ${MAX_SOLUTION_FILE_BYTES / 1024} kB`,
      unexpectedField: (field) => `send the orbit solution in the multipart field "file" (got "${field}")`,
      tooManyFiles: 'send one file at a time',
    },
    refuse: (message) => unprocessable('The orbit solution was refused: nothing was stored', { issues: [{ where: 'file', message }] }),
  });

export function objectsRouter({ objects }: Services): Router {
  const router = Router();
  router.get('/objects', handle({ query: objectListQuerySchema }, ({ query }) => objects.list(query)));
  router.post('/objects', handle({ body: createObjectBodySchema }, ({ body, req }) => objects.create(body, req.user!.id), { status: 201 }));
  router.get('/objects/:id', handle({ params: idParamsSchema }, ({ params }) => objects.get(params.id)));
  router.patch('/objects/:id', handle({ params: idParamsSchema, body: updateObjectBodySchema }, ({ params, body }) => objects.update(params.id, body)));

  router.get(
    '/objects/:id/solutions',
    handle({ params: idParamsSchema }, ({ params }): SolutionListResponse => ({ solutions: objects.listSolutions(params.id) })),
  );
  router.post(
    '/objects/:id/solutions',
    singleSolutionFile(),
    handle({ params: idParamsSchema }, ({ params, req }) => {
      const actor = req.user!.id;
      if (req.is('multipart/form-data')) {
        const { body: fit } = parseRequest(req, { body: solutionUploadFieldsSchema });
        if (!req.file) {
          throw unprocessable('The orbit solution was refused: nothing was stored', {
            issues: [{ where: 'file', message: 'no file: send the orbit solution in the multipart field "file"' }],
          });
        }
        const text = textOfUpload(req.file.buffer);
        const fileName = req.file.originalname ? req.file.originalname.slice(0, 255) : null;
        return objects.addSolution(params.id, { text, sourceKind: 'opm', fileName, fit }, actor);
      }
      const { body } = parseRequest(req, { body: solutionFormBodySchema });
      const { solution, ...fit } = body;
      const designation = solution.designation ?? objects.get(params.id).designation;
      const text = JSON.stringify({ ...solution, designation }, null, 2);
      return objects.addSolution(params.id, { text, sourceKind: 'form', fileName: null, fit }, actor);
    }, { status: 201 }),
  );
  router.get(
    '/objects/:id/solutions/:version',
    handle({ params: solutionParamsSchema }, ({ params }) => objects.getSolution(params.id, params.version)),
  );
  router.get(
    '/objects/:id/compare',
    handle({ params: idParamsSchema, query: compareQuerySchema }, ({ params, query }) => objects.compare(params.id, query.a, query.b)),
  );
  return router;
}
