/**
 * Every call the page makes to the server, in one place, typed after docs/api.md (the contract)
 * with the engine's own document types. Types only from server/ (never its runtime code). Each
 * call takes an optional AbortSignal (the @lit/task signal) and throws ApiError with the
 * problem document's detail, which says what is wrong and what to do.
 */
import type { AnalysisSummary } from '../shared/analysis/summary.ts';
import type { CoilReport } from '../shared/physics/coil/analyze.ts';
import type { SetResult } from '../shared/plan/set.ts';
import type { Modulation } from '../shared/schemas/api.ts';
import type { CoilProfile } from '../shared/schemas/coil.ts';
import type { DeviceRole, DriverProfile } from '../shared/schemas/driver.ts';
import type { PlanDocument } from '../server/services/plan.ts';
import type { PreviewSummary, RenderSummary } from '../server/services/render.ts';

export type { AnalysisSummary, CoilReport, PlanDocument, PreviewSummary, RenderSummary, SetResult };

export type JobState = 'queued' | 'running' | 'done' | 'failed';
export interface Job {
  id: string;
  kind: 'analysis' | 'set-plan' | 'render' | 'preview';
  state: JobState;
  progress: number;
  stage: string;
  error: null | { code: string; detail: string; field?: string };
  resultId: string | null;
  createdAt: string;
  updatedAt: string;
}

export interface Clip {
  id: string;
  name: string;
  sha256: string;
  sizeBytes: number;
  format: 'wav' | 'flac' | 'ogg' | 'mp3';
  sampleRate: number;
  channels: number;
  durationS: number;
  createdAt: string;
}

export type Channel = 'mix' | 'left' | 'right';
export interface AnalysisSettings {
  channel: Channel;
  frameMs: number;
}
export interface Analysis {
  id: string;
  clipId: string;
  settings: AnalysisSettings;
  engineVersion: string;
  state: JobState;
  jobId: string;
  summary: AnalysisSummary | null;
  createdAt: string;
}

export interface DisplayData {
  fromS: number;
  toS: number;
  timeS: number[];
  peakMin: number[];
  peakMax: number[];
  rmsDbfs: (number | null)[];
  spectrum: { freqHz: number[]; powerDb: number[] };
  spectrogram: { timeS: number[]; freqHz: number[]; powerDb: number[][] };
}

export interface Coil {
  id: string;
  name: string;
  profile: CoilProfile;
  report: CoilReport;
  createdAt: string;
  updatedAt: string;
}
export interface Driver {
  id: string;
  name: string;
  profile: DriverProfile;
  createdAt: string;
  updatedAt: string;
}

export interface PlanSettingsRequest {
  marginK?: number;
  allowedShare?: number;
  ambientC?: number;
}
export interface PlanRequest {
  clipId: string;
  coilId: string;
  driverId: string;
  gainDb?: number | null;
  channel?: Channel;
  settings?: PlanSettingsRequest;
}
export interface Plan {
  id: string;
  clipId: string;
  coilId: string;
  driverId: string;
  analysisId: string;
  coil: CoilProfile;
  driver: DriverProfile;
  gainDb: number | null;
  document: PlanDocument;
  createdAt: string;
}

export interface DeviceTemperatures {
  role: DeviceRole;
  junctionC: number[];
  limitC: number;
  tjMaxC?: number;
}
export interface Evaluated {
  document: PlanDocument;
  temperatures: { timeS: number[]; devices: DeviceTemperatures[] };
}

/** The modulation grid as the server's schema describes it (shared/schemas/api.ts), with the scheme's own type. */
export type ModulationData = Omit<Modulation, 'scheme'> & { scheme: DriverProfile['scheme'] };

export interface SetItem {
  clipId: string;
  gapAfterS: number;
  gainDb: number | null;
}
export interface SetRequest {
  name: string;
  coilId: string;
  driverId: string;
  items: SetItem[];
  commonGain?: boolean;
}
export interface ShowSet extends SetRequest {
  id: string;
  createdAt: string;
  updatedAt: string;
}
export interface SetPlan {
  result: SetResult;
  temperatures: { timeS: number[]; devices: DeviceTemperatures[]; gaps: { fromS: number; toS: number }[] };
}

export interface RenderRequest {
  kind: 'render' | 'preview';
  gainDb?: number | null;
  format?: 's16' | 's24' | 'f32';
  preEmphasisDb?: number;
  ceilingDbfs?: number;
}
export interface Render {
  id: string;
  planId: string;
  kind: 'render' | 'preview';
  state: JobState;
  jobId: string;
  safe: boolean | null;
  summary: RenderSummary | PreviewSummary | null;
  createdAt: string;
}

export interface Cautions {
  summary: string;
  items: { topic: 'mains' | 'high-voltage' | 'rf-burns' | 'ozone' | 'fire' | 'radio' | 'hearing'; text: string }[];
}

/** A refused or failed call: the problem document's status, code, detail and dotted field. */
export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    readonly detail: string,
    readonly field: string | null,
    readonly retryAfterS: number | null = null,
  ) {
    super(detail);
    this.name = 'ApiError';
  }
}

/** The API's base: same origin as the page. */
let base = '';
/** Points the calls at another origin (tests). */
export function setApiBase(origin: string): void {
  base = origin.replace(/\/$/, '');
}
export const apiUrl = (path: string): string => `${base}${path}`;

async function problem(res: Response): Promise<ApiError> {
  let body: { detail?: string; title?: string; code?: string; field?: string } = {};
  try {
    body = (await res.json()) as typeof body;
  } catch {
    // Not a problem document (a proxy's page): the status says enough.
  }
  const retry = res.headers.get('retry-after');
  return new ApiError(
    res.status,
    body.code ?? `http-${res.status}`,
    body.detail ?? body.title ?? `the server answered ${res.status} ${res.statusText}; try again`,
    body.field ?? null,
    retry === null ? null : Number(retry),
  );
}

async function call<T>(method: string, path: string, body?: unknown, signal?: AbortSignal): Promise<T> {
  const init: RequestInit = { method, signal };
  if (body !== undefined) {
    init.headers = { 'content-type': 'application/json' };
    init.body = JSON.stringify(body);
  }
  let res: Response;
  try {
    res = await fetch(apiUrl(path), init);
  } catch (e) {
    if ((e as Error).name === 'AbortError') throw e;
    throw new ApiError(0, 'unreachable', 'the coilcue server does not answer: check that it is running (npm start) and reload the page', null);
  }
  if (!res.ok) throw await problem(res);
  if (res.status === 204) return undefined as T;
  return (await res.json()) as T;
}

const q = (params: Record<string, number | string | undefined | null>): string => {
  const s = Object.entries(params)
    .filter(([, v]) => v !== undefined && v !== null && !(typeof v === 'number' && !Number.isFinite(v)))
    .map(([k, v]) => `${encodeURIComponent(k)}=${encodeURIComponent(String(v))}`)
    .join('&');
  return s ? `?${s}` : '';
};

// Service
export const getCautions = (signal?: AbortSignal) => call<Cautions>('GET', '/api/cautions', undefined, signal);

// Jobs
export const getJob = (id: string, signal?: AbortSignal) => call<Job>('GET', `/api/jobs/${id}`, undefined, signal);
export const jobEventsUrl = (id: string): string => apiUrl(`/api/jobs/${id}/events`);

// Clips
export const listClips = (signal?: AbortSignal) => call<{ items: Clip[] }>('GET', '/api/clips', undefined, signal);
export const getClip = (id: string, signal?: AbortSignal) => call<Clip>('GET', `/api/clips/${id}`, undefined, signal);
export const deleteClip = (id: string) => call<void>('DELETE', `/api/clips/${id}`);
export const clipAudioUrl = (id: string): string => apiUrl(`/api/clips/${id}/audio`);

/**
 * Uploads a clip (multipart field `file`), reporting the bytes sent as a fraction 0…1 (fetch has
 * no upload progress, so this one call uses XMLHttpRequest).
 */
export function uploadClip(file: File, onProgress: (fraction: number) => void, signal?: AbortSignal): Promise<Clip> {
  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open('POST', apiUrl('/api/clips'));
    xhr.responseType = 'text';
    xhr.upload.onprogress = (e) => {
      if (e.lengthComputable && e.total > 0) onProgress(e.loaded / e.total);
    };
    xhr.onload = () => {
      let body: Record<string, unknown> = {};
      try {
        body = JSON.parse(xhr.responseText) as Record<string, unknown>;
      } catch {
        // fall through to the status
      }
      if (xhr.status >= 200 && xhr.status < 300) resolve(body as unknown as Clip);
      else
        reject(
          new ApiError(
            xhr.status,
            String(body.code ?? `http-${xhr.status}`),
            String(body.detail ?? `the upload was refused (${xhr.status}); check the file is WAV, FLAC, Ogg Vorbis or MP3`),
            (body.field as string | undefined) ?? null,
          ),
        );
    };
    xhr.onerror = () => reject(new ApiError(0, 'unreachable', 'the upload did not reach the server: check that it is running and try again', null));
    signal?.addEventListener('abort', () => xhr.abort());
    const form = new FormData();
    form.append('file', file, file.name);
    xhr.send(form);
  });
}

// Analyses
export const startAnalysis = (clipId: string, settings: Partial<AnalysisSettings> = {}, signal?: AbortSignal) =>
  call<{ analysis: Analysis; job: Job }>('POST', `/api/clips/${clipId}/analyses`, settings, signal);
export const getAnalysis = (id: string, signal?: AbortSignal) => call<Analysis>('GET', `/api/analyses/${id}`, undefined, signal);
export const getDisplay = (id: string, opts: { columns?: number; fromS?: number; toS?: number } = {}, signal?: AbortSignal) =>
  call<DisplayData>('GET', `/api/analyses/${id}/display${q(opts)}`, undefined, signal);

// Profiles
export const listCoils = (signal?: AbortSignal) => call<{ items: Coil[] }>('GET', '/api/coils', undefined, signal);
export const listDrivers = (signal?: AbortSignal) => call<{ items: Driver[] }>('GET', '/api/drivers', undefined, signal);
export const createCoil = (profile: unknown) => call<Coil>('POST', '/api/coils', profile);
export const createDriver = (profile: unknown) => call<Driver>('POST', '/api/drivers', profile);
export const replaceCoil = (id: string, profile: unknown) => call<Coil>('PUT', `/api/coils/${id}`, profile);
export const replaceDriver = (id: string, profile: unknown) => call<Driver>('PUT', `/api/drivers/${id}`, profile);
export const coilExportUrl = (id: string): string => apiUrl(`/api/coils/${id}/export`);
export const driverExportUrl = (id: string): string => apiUrl(`/api/drivers/${id}/export`);

// Plans
export const createPlan = (req: PlanRequest, signal?: AbortSignal) => call<Plan | { job: Job }>('POST', '/api/plans', req, signal);
export const getPlan = (id: string, signal?: AbortSignal) => call<Plan>('GET', `/api/plans/${id}`, undefined, signal);
export const evaluatePlan = (id: string, gainDb: number, columns?: number, signal?: AbortSignal) =>
  call<Evaluated>('POST', `/api/plans/${id}/evaluate`, columns === undefined ? { gainDb } : { gainDb, columns }, signal);
export const getModulation = (id: string, opts: { columns?: number; fromS?: number; toS?: number; gainDb?: number }, signal?: AbortSignal) =>
  call<ModulationData>('GET', `/api/plans/${id}/modulation${q(opts)}`, undefined, signal);

// Sets
export const listSets = (signal?: AbortSignal) => call<{ items: ShowSet[] }>('GET', '/api/sets', undefined, signal);
export const createSet = (req: SetRequest) => call<ShowSet>('POST', '/api/sets', req);
export const replaceSet = (id: string, req: SetRequest) => call<ShowSet>('PUT', `/api/sets/${id}`, req);
export const startSetPlan = (id: string) => call<{ job: Job }>('POST', `/api/sets/${id}/plan`, {});
export const getSetPlan = (id: string, signal?: AbortSignal) => call<SetPlan>('GET', `/api/sets/${id}/plan`, undefined, signal);

// Renders
export const startRender = (planId: string, req: RenderRequest) => call<{ render: Render; job: Job }>('POST', `/api/plans/${planId}/renders`, req);
export const getRender = (id: string, signal?: AbortSignal) => call<Render>('GET', `/api/renders/${id}`, undefined, signal);
export const renderAudioUrl = (id: string): string => apiUrl(`/api/renders/${id}/audio`);
