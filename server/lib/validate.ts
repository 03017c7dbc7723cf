import type { RequestHandler, Request } from 'express';
import { z, type ZodType } from 'zod';

type Schemas = { body?: ZodType; query?: ZodType; params?: ZodType };

type Parsed<S extends Schemas> = {
  body: S['body'] extends ZodType ? z.infer<S['body']> : undefined;
  query: S['query'] extends ZodType ? z.infer<S['query']> : undefined;
  params: S['params'] extends ZodType ? z.infer<S['params']> : undefined;
};

const PARSED = Symbol('parsed');

/**
 * Validates `{ body, query, params }` with zod and hands the parsed values on: read them with `parsed(req, schemas)`.
 * A ZodError reaches the error middleware and becomes a 400 with its issues.
 */
export function validate<S extends Schemas>(schemas: S): RequestHandler & { schemas: S } {
  const handler: RequestHandler = (req, _res, next) => {
    const out = {
      body: schemas.body ? schemas.body.parse(req.body ?? {}) : undefined,
      query: schemas.query ? schemas.query.parse(req.query) : undefined,
      params: schemas.params ? schemas.params.parse(req.params) : undefined,
    };
    (req as Request & { [PARSED]?: unknown })[PARSED] = out;
    next();
  };
  return Object.assign(handler, { schemas });
}

/** The values parsed by the `validate` middleware of this route. */
export function parsed<S extends Schemas>(req: Request, _v: { schemas: S }): Parsed<S> {
  return (req as Request & { [PARSED]?: Parsed<S> })[PARSED] as Parsed<S>;
}

export const uuidParam = z.string().uuid({ message: 'Not a valid id.' });
