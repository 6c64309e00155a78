// One uploaded file in the multipart field `file`, kept in memory (multer): the file routes (orbit solutions,
// astrometry) differ only in their limits, the words of a refusal and the error a refusal becomes.
import type { RequestHandler } from 'express';
import multer from 'multer';
import { HttpError } from '../errors';

export interface SingleFileUploadOptions {
  /** multer limits besides `files: 1`: the file's bytes, how many other fields and how long each may be. */
  limits: { fileSize: number; fields: number; fieldSize: number };
  /** The route's wording of the refusals multer reports (others keep multer's own message). */
  messages: { tooLarge: string; unexpectedField: (field: string) => string; tooManyFiles: string };
  /** The error a refusal becomes (the route's own error and status). */
  refuse: (message: string) => Error;
}

/** Middleware reading one file from the multipart field `file`; a request that is not multipart passes through. */
export function singleFileUpload({ limits, messages, refuse }: SingleFileUploadOptions): RequestHandler {
  const upload = multer({ storage: multer.memoryStorage(), limits: { ...limits, files: 1 } }).single('file');
  return (req, res, next) => {
    upload(req, res, (err: unknown) => {
      if (!err) return next();
      if (err instanceof multer.MulterError) {
        const message =
          err.code === 'LIMIT_FILE_SIZE'
            ? messages.tooLarge
            : err.code === 'LIMIT_UNEXPECTED_FILE'
              ? messages.unexpectedField(err.field ?? '')
              : err.code === 'LIMIT_FILE_COUNT'
                ? messages.tooManyFiles
                : err.message;
        return next(refuse(message));
      }
      next(new HttpError(400, 'bad_request', 'The multipart request could not be read'));
    });
  };
}
