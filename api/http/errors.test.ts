// Every error answer has one shape, { error, details? } (plus uploadId where a file was refused),
// whatever raised it: a schema, a route, Express's body parser, an unknown path or a fault.
import express from 'express';
import request from 'supertest';
import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import { rowErrorDetail } from '@shared/schemas/errors';
import { DomainError } from '@api/spc/errors';
import { errorHandler, fieldError, HttpError, notFoundApi, parseBody } from './errors';

function app() {
  const a = express();
  a.use(express.json({ limit: '1kb' }));
  a.post('/api/zod', (req, res) => {
    res.json(parseBody(z.object({ email: z.email('Enter a valid e-mail address'), age: z.int().min(18, 'Must be 18 or older') }), req.body));
  });
  a.post('/api/field', () => {
    throw fieldError('value', '12 MPa is outside the possible range 0–200 MPa');
  });
  a.post('/api/file', () => {
    throw new HttpError(422, 'Nothing was imported: 1 row needs correcting', [rowErrorDetail({ row: 12, column: 'value', message: '"heavy" is not a number' })], { uploadId: 41 });
  });
  a.get('/api/domain/:kind', (req) => {
    throw new DomainError(req.params.kind as DomainError['kind'], `Refused as ${req.params.kind}`);
  });
  a.get('/api/fault', () => {
    throw new Error('relation "nowhere" does not exist');
  });
  a.use('/api', notFoundApi);
  a.use(errorHandler);
  return a;
}

const shapeOf = (body: Record<string, unknown>) => Object.keys(body).sort();

describe('the error shape', () => {
  it('names each field of a schema failure in details', async () => {
    const res = await request(app()).post('/api/zod').send({ email: 'x', age: 12 });
    expect(res.status).toBe(400);
    expect(res.body).toEqual({
      error: 'email: Enter a valid e-mail address',
      details: [
        { path: 'email', message: 'Enter a valid e-mail address' },
        { path: 'age', message: 'Must be 18 or older' },
      ],
    });
  });

  it('puts a rule checked by a route under its field', async () => {
    const res = await request(app()).post('/api/field').send({});
    expect(res.body).toEqual({ error: 'value: 12 MPa is outside the possible range 0–200 MPa', details: [{ path: 'value', message: '12 MPa is outside the possible range 0–200 MPa' }] });
  });

  it('gives each refused row of a file as a detail with its row and column, and the stored upload', async () => {
    const res = await request(app()).post('/api/file').send({});
    expect(res.status).toBe(422);
    expect(res.body).toEqual({
      error: 'Nothing was imported: 1 row needs correcting',
      details: [{ path: 'row 12 › value', row: 12, column: 'value', message: '"heavy" is not a number' }],
      uploadId: 41,
    });
  });

  it('answers an unreadable body, a body too large, an unknown endpoint and a fault with { error } only', async () => {
    const unreadable = await request(app()).post('/api/zod').set('Content-Type', 'application/json').send('{"email":');
    const large = await request(app()).post('/api/zod').send({ email: 'x'.repeat(2000) });
    const unknown = await request(app()).get('/api/nowhere');
    const fault = await request(app()).get('/api/fault');
    expect([unreadable.status, large.status, unknown.status, fault.status]).toEqual([400, 413, 404, 500]);
    for (const res of [unreadable, large, unknown, fault]) {
      expect(shapeOf(res.body)).toEqual(['error']);
      expect(typeof res.body.error).toBe('string');
    }
    expect(fault.body.error).not.toMatch(/relation|nowhere/);
  });

  it('answers a refusal of the domain with the status of its kind, whichever route met it (RFC 9110 §15.5)', async () => {
    const statuses = { 'not-found': 404, conflict: 409, invalid: 400, 'not-possible': 422 } as const;
    for (const [kind, status] of Object.entries(statuses)) {
      const res = await request(app()).get(`/api/domain/${kind}`);
      expect(res.status).toBe(status);
      expect(res.body).toEqual({ error: `Refused as ${kind}` });
    }
  });
});
