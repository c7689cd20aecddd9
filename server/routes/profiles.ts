/**
 * Coil and driver profiles: create (import is the same call), read, replace, delete, export. The
 * body is the profile file's JSON, checked by the profile parsers (shared/schemas/), whose errors
 * name the dotted field; a coil answers with its report (`coilcue coil --json`'s document).
 */
import type { FastifyPluginAsyncTypebox } from '@fastify/type-provider-typebox';
import { Type } from 'typebox';
import { CoilListSchema, CoilSchema, DriverListSchema, DriverSchema, IdParams, problems } from '../../shared/schemas/api.ts';
import { type CoilProfile, CoilProfileSchema, parseCoilProfile } from '../../shared/schemas/coil.ts';
import { type DriverProfile, DriverProfileSchema, parseDriverProfile } from '../../shared/schemas/driver.ts';
import { notFound } from '../plugins/errors.ts';
import { coilReportFor } from '../services/profiles.ts';
import type { ProfileRow } from '../storage/store.ts';
import { attachment } from './clips.ts';

/* eslint-disable @typescript-eslint/no-explicit-any -- one loop serves both kinds; the schemas type the answers */
const coilView = (r: ProfileRow<CoilProfile>) => ({ ...r, report: coilReportFor(r.profile) as unknown as Record<string, unknown> });

const routes: FastifyPluginAsyncTypebox = async (app) => {
  const { store } = app;
  const kinds = [
    { kind: 'coil' as const, path: 'coils', body: CoilProfileSchema, one: CoilSchema, list: CoilListSchema, parse: parseCoilProfile as (j: unknown) => CoilProfile | DriverProfile, view: (r: ProfileRow<never>): any => coilView(r as ProfileRow<CoilProfile>) },
    { kind: 'driver' as const, path: 'drivers', body: DriverProfileSchema, one: DriverSchema, list: DriverListSchema, parse: parseDriverProfile as (j: unknown) => CoilProfile | DriverProfile, view: (r: ProfileRow<never>): any => r },
  ];
  for (const k of kinds) {
    // The parsers check everything the schema does and more, with messages that say what to do;
    // the schema is attached for the OpenAPI description, and its own verdict is left to them.
    app.get(`/${k.path}`, { schema: { response: { 200: k.list } } }, async () => ({ items: store.listProfiles<never>(k.kind).map(k.view) }));
    app.post(`/${k.path}`, { attachValidation: true, schema: { summary: `Create (or import) a ${k.kind} profile`, body: k.body, response: { 201: k.one, ...problems(400, 413) } } }, async (req, reply) => {
      const profile = k.parse(req.body);
      return reply.code(201).send(k.view(store.insertProfile(k.kind, profile) as ProfileRow<never>));
    });
    app.get(`/${k.path}/:id`, { schema: { params: IdParams, response: { 200: k.one, ...problems(404) } } }, async (req) => {
      const r = store.getProfile<never>(k.kind, req.params.id);
      if (!r) throw notFound(k.kind, req.params.id);
      return k.view(r);
    });
    app.put(`/${k.path}/:id`, { attachValidation: true, schema: { summary: `Replace a ${k.kind} profile`, params: IdParams, body: k.body, response: { 200: k.one, ...problems(400, 404) } } }, async (req) => {
      if (!store.getProfile(k.kind, req.params.id)) throw notFound(k.kind, req.params.id);
      const profile = k.parse(req.body);
      return k.view(store.updateProfile(k.kind, req.params.id, profile) as ProfileRow<never>);
    });
    app.delete(`/${k.path}/:id`, { schema: { params: IdParams, summary: `Delete a ${k.kind} profile (409 while a set uses it)`, response: { 204: Type.Null(), ...problems(404, 409) } } }, async (req, reply) => {
      if (!store.deleteProfile(k.kind, req.params.id)) throw notFound(k.kind, req.params.id);
      return reply.code(204).send(null);
    });
    app.get(`/${k.path}/:id/export`, { schema: { params: IdParams, summary: 'The profile file', response: { 200: Type.Unknown({ description: 'the profile file (JSON)' }), ...problems(404) } } }, async (req, reply) => {
      const r = store.getProfile<CoilProfile | DriverProfile>(k.kind, req.params.id);
      if (!r) throw notFound(k.kind, req.params.id);
      return reply.header('content-disposition', attachment(`${r.name}.json`)).type('application/json').send(JSON.stringify(r.profile, null, 2) + '\n');
    });
  }
};

export default routes;
