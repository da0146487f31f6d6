/**
 * Landscape pages: the demo maps and map uploads, the band-options table (works without JavaScript; with
 * it, a click on the map preview places a band's centre line), the durable run with progress and cancel,
 * and the result page (the answer per option first, then the maps side by side, the downloads and the PDF
 * briefing, then the cautions). Every page calls the same analysis functions as the CLI
 * (evaluateLandscapeScenario in the worker, loadLandscape for the checks before a run is queued).
 */
import type { FastifyInstance, FastifyReply, FastifyRequest } from 'fastify';
import type { MultipartFile } from '@fastify/multipart';
import { parseLandscapeScenario, MAX_MODEL_CELLS, type LandscapeScenario } from '../model/landscape.ts';
import { InputError, type Problem } from '../model/errors.ts';
import { loadLandscape, type LoadedLandscape } from '../domain/gis/load.ts';
import { hostCoverMap, mapBaseOf } from '../report/maps/index.ts';
import { ensembleLines, transportLine } from '../report/landscape/summary.ts';
import { problemItems } from './view-models/problems.ts';
import { notFound } from './plugins/errors.ts';
import type { WebDeps } from './deps.ts';
import type { LandscapeDemo } from './landscape-catalogue.ts';
import type { LandscapeJobs, LandscapeJobView, LandscapeOutput } from './landscape-jobs.ts';
import { applyPostedPest, pestFieldsets, postedPest } from './landscape-pest-form.ts';
import { applyBandAction, bandsToRows, MAX_BAND_ROWS, rowsFromBody, rowsToBands, type BandRow } from './landscape-bands-form.ts';

export interface LandscapeDeps extends WebDeps {
  landscapeDemos: LandscapeDemo[];
  landscapeJobs: LandscapeJobs;
  /** Largest uploaded map or scenario file [bytes]. */
  landscapeUploadBytes: number;
}

/** What a band table starts from: a demo, or the scenario and map files of an earlier run (an upload). */
interface Base {
  key: string;
  title: string;
  description: string;
  raw: Record<string, unknown>;
  files: Record<string, Uint8Array>;
  cellNote: string;
  source: string;
  action: string;
}

/** Width of the map preview [px]; the click script reads the frame from the data attributes. */
const PREVIEW_WIDTH = 640;
/** The map renderer's left and top margins [px] (server/report/maps/landscape-maps.ts, MARGIN). */
const FRAME_LEFT = 64;
const FRAME_TOP = 28;
const FRAME_RIGHT = 14;

const b64 = (b: Uint8Array) => Buffer.from(b).toString('base64');

const clone = <T>(v: T): T => JSON.parse(JSON.stringify(v)) as T;

const years = (v: number | null) => (v === null ? 'not within the horizon' : `year ${v.toFixed(1)}`);

const WAY_PAST: Record<string, string> = {
  through: 'through the band',
  around: 'around its ends',
  none: 'not past within the horizon',
};

function limitsView(uploadBytes: number) {
  return [
    `Each file at most ${(uploadBytes / 1048576).toFixed(uploadBytes < 1048576 ? 2 : 0)} MB.`,
    `At most ${MAX_MODEL_CELLS.toLocaleString('en-GB')} model cells (map extent ÷ model cell; set map.cellM in the scenario to coarsen).`,
    'A projected CRS in metres (read from the GeoTIFF); a geographic (degree) raster is refused — reproject it first. GeoJSON stands are in longitude/latitude as the standard says; the tool chooses the metric projection and names it.',
    'Every band must cross host forest, and every infested place must lie on the map.',
    `At most ${MAX_BAND_ROWS} band options.`,
  ];
}

/** What the page parts share: the dependencies and the preview cache of this app instance. */
interface Pages {
  deps: LandscapeDeps;
  demos: LandscapeDemo[];
  jobs: LandscapeJobs;
  previewCache: Map<string, { svg: string; frame: Record<string, number> }>;
}

export default async function landscapePages(app: FastifyInstance, deps: LandscapeDeps) {
  const pages: Pages = { deps, demos: deps.landscapeDemos, jobs: deps.landscapeJobs, previewCache: new Map() };
  app.get('/landscapes', async (_req, reply) => listPage(pages, reply));
  bandRoutes(app, pages);
  app.post('/landscapes/upload', { config: { rateLimit: deps.computeRateLimit } }, async (req, reply) => upload(pages, req, reply));
  runRoutes(app, pages);
}

/** The band tables of a demo and of an earlier run: shown, rows added or removed, run. */
function bandRoutes(app: FastifyInstance, pages: Pages) {
  const { deps } = pages;
  app.get<{ Params: { ref: string } }>('/landscapes/:ref', async (req, reply) => {
    const base = demoBase(pages, req.params.ref);
    return bandsPage(pages, reply, base, bandsToRows(((base.raw.bands as { options?: Record<string, unknown>[] })?.options ?? [])));
  });
  app.post<{ Params: { ref: string }; Body: Record<string, unknown> }>('/landscapes/:ref/bands', { config: deps.formPost }, async (req, reply) =>
    postBands(pages, reply, demoBase(pages, req.params.ref), req.body ?? {}),
  );
  app.get<{ Params: { id: string } }>('/landscape-runs/:id/bands', async (req, reply) => {
    const base = runBase(pages, req.params.id);
    return bandsPage(pages, reply, base, bandsToRows(((base.raw.bands as { options?: Record<string, unknown>[] })?.options ?? [])));
  });
  app.post<{ Params: { id: string }; Body: Record<string, unknown> }>('/landscape-runs/:id/bands', { config: deps.formPost }, async (req, reply) =>
    postBands(pages, reply, runBase(pages, req.params.id), req.body ?? {}),
  );
}

/** A map evaluation: its progress or result page, cancel, its state as JSON, its downloads. */
function runRoutes(app: FastifyInstance, pages: Pages) {
  const { deps, jobs } = pages;
  const jobOr404 = (id: string): LandscapeJobView => {
    const j = jobs.get(id);
    if (!j) throw notFound(`Map evaluation "${id}"`);
    return j;
  };

  app.get<{ Params: { id: string } }>('/landscape-runs/:id', async (req, reply) => {
    const job = jobOr404(req.params.id);
    const out = job.status === 'done' ? jobs.output(job.id) : undefined;
    return reply.page('landscape-run', {
      title: out ? `Map result: ${job.title}` : `Map evaluation: ${job.title}`,
      job: { ...job, percent: Math.round(100 * job.fraction), live: !['done', 'failed', 'cancelled'].includes(job.status), failed: job.status === 'failed' || job.status === 'cancelled' },
      problems: problemItems(job.problems),
      out: out ? resultView(job.id, out) : null,
      // Without JavaScript the progress page reloads itself every 2 s while the job runs.
      refresh: !out && !['failed', 'cancelled'].includes(job.status) ? 2 : 0,
      scripts: ['/assets/landscape.js'],
    });
  });
  app.post<{ Params: { id: string } }>('/landscape-runs/:id/cancel', { config: deps.formPost }, async (req, reply) => {
    jobOr404(req.params.id);
    jobs.cancel(req.params.id);
    return reply.redirect(`/landscape-runs/${req.params.id}`, 303);
  });
  app.get<{ Params: { id: string } }>('/api/landscape-runs/:id', async (req) => jobOr404(req.params.id));
  app.get<{ Params: { id: string; name: string } }>('/landscape-runs/:id/files/:name', async (req, reply) => {
    const d = jobs.download(req.params.id, req.params.name);
    if (!d) throw notFound(`Download "${req.params.name}"`);
    return reply
      .type(d.type)
      .header('content-disposition', `${d.type === 'application/pdf' ? 'inline' : 'attachment'}; filename="${d.name.replace(/[^A-Za-z0-9._-]/g, '_')}"`)
      .send(d.bytes);
  });
}

function demoBase({ demos }: Pages, ref: string): Base {
  const d = demos.find((x) => x.ref === ref);
  if (!d) throw notFound(`Map scenario "${ref}"`);
  return { key: d.ref, title: d.title, description: d.description, raw: d.raw, files: d.files, cellNote: d.cellNote, source: d.ref, action: `/landscapes/${d.ref}/bands` };
}

function runBase({ deps }: Pages, id: string): Base {
  const row = deps.store.jobs.get(id);
  if (!row || row.kind !== 'landscape') throw notFound(`Map evaluation "${id}"`);
  const inp = row.scenario as unknown as { scenario: Record<string, unknown>; files: Record<string, string>; source: string; cellNote: string };
  const files = Object.fromEntries(Object.entries(inp.files).map(([k, v]) => [k, new Uint8Array(Buffer.from(v, 'base64'))]));
  return { key: id, title: String(inp.scenario.title ?? row.title), description: String(inp.scenario.description ?? ''), raw: inp.scenario, files, cellNote: inp.cellNote, source: inp.source, action: `/landscape-runs/${id}/bands` };
}

/** The host-cover preview of a base map with its frame for the click script (null when the map does not load). */
async function preview({ previewCache }: Pages, base: Base) {
  const hit = previewCache.get(base.key);
  if (hit) return hit;
  let loaded: LoadedLandscape;
  try {
    loaded = await loadLandscape(parseLandscapeScenario(base.raw), base.files);
  } catch {
    return null; // the band checks say what is wrong
  }
  const mb = mapBaseOf(loaded);
  const chart = hostCoverMap(mb, { width: PREVIEW_WIDTH });
  const scale = (PREVIEW_WIDTH - FRAME_LEFT - FRAME_RIGHT) / (mb.grid.nx * mb.grid.cellM);
  const out = { svg: chart.svg, frame: { left: FRAME_LEFT, top: FRAME_TOP, scale, x0: mb.grid.originXM, y0: mb.grid.originYM } };
  previewCache.set(base.key, out);
  while (previewCache.size > 20) previewCache.delete(previewCache.keys().next().value as string);
  return out;
}

async function bandsPage(pages: Pages, reply: FastifyReply, base: Base, rows: BandRow[], problems: Problem[] = [], status = 200, posted: Record<string, string> | null = null) {
  const pv = await preview(pages, base);
  const s = base.raw as { bands?: { costPerStem?: number; costPerHa?: number; costUnit?: string }; horizonYears?: number; coordinates?: string };
  const lonlat = s.coordinates === 'lonlat';
  const bad = new Set(problems.map((p) => p.path));
  return reply.page(
    'landscape',
    {
      title: `Map: ${base.title}`,
      base: { title: base.title, description: base.description, action: base.action, cellNote: base.cellNote },
      rows: rows.map((r, k) => ({
        ...r,
        k,
        n: k + 1,
        letter: String.fromCharCode(65 + k),
        clearing: r.cover === 'clearing',
        bad: { name: bad.has(`bands.options[${k}].name`), widthM: bad.has(`bands.options[${k}].widthM`), line: bad.has(`bands.options[${k}].line`) },
      })),
      bandCount: rows.length,
      canAdd: rows.length < MAX_BAND_ROWS,
      coordsWord: lonlat ? 'longitude latitude [°]' : 'x y in the map CRS [m]',
      lonlat,
      preview: pv,
      pestGroups: pestFieldsets((base.raw.pest as Record<string, unknown>) ?? {}, posted, problems),
      problems: problemItems(problems),
      horizonYears: s.horizonYears,
      scripts: ['/assets/landscape.js', ...(problems.length ? ['/assets/focus-problems.js'] : [])],
    },
    status,
  );
}

/** Band rows posted: add/remove a row (page again), or run (checks, then the job). */
async function postBands(pages: Pages, reply: FastifyReply, base: Base, body: Record<string, unknown>) {
  const action = typeof body.action === 'string' ? body.action : 'run';
  const rows = rowsFromBody(body);
  const posted = postedPest(body);
  if (action !== 'run') return bandsPage(pages, reply, base, applyBandAction(rows, action), [], 200, posted);
  const { options, problems } = rowsToBands(rows);
  if (problems.length) return bandsPage(pages, reply, base, rows, problems, 400, posted);
  const raw = clone(base.raw);
  raw.bands = { ...((raw.bands as object) ?? {}), options };
  raw.pest = applyPostedPest((raw.pest as Record<string, unknown>) ?? {}, posted);
  return start(pages, reply, raw, base.files, base.source, base.cellNote, (p, st) => bandsPage(pages, reply, base, rows, p, st, posted));
}

/** Validates the scenario and its map (every named map error, by field) before the job is queued. */
async function start(
  { jobs }: Pages,
  reply: FastifyReply,
  raw: Record<string, unknown>,
  files: Record<string, Uint8Array>,
  source: string,
  cellNote: string,
  fail: (p: Problem[], status: number) => Promise<FastifyReply>,
) {
  let scenario: LandscapeScenario;
  try {
    scenario = parseLandscapeScenario(raw);
    await loadLandscape(scenario, files);
  } catch (e) {
    if (e instanceof InputError) return fail(e.problems, (e as { code?: string }).code === 'MAP_FILE_TOO_LARGE' ? 413 : 400);
    throw e;
  }
  const job = jobs.submit(scenario.title, { scenario: raw, files: Object.fromEntries(Object.entries(files).map(([k, v]) => [k, b64(v)])), source, cellNote });
  return reply.redirect(`/landscape-runs/${job.id}`, 303);
}

function listPage({ demos, deps }: Pages, reply: FastifyReply, problems: Problem[] = [], status = 200) {
  return reply.page(
    'landscapes',
    {
      title: 'Landscape maps',
      demos: demos.map((d) => ({ ref: d.ref, title: d.title, description: d.description, link: `/landscapes/${d.ref}`, cellNote: d.cellNote })),
      limits: limitsView(deps.landscapeUploadBytes),
      problems: problemItems(problems),
      scripts: problems.length ? ['/assets/focus-problems.js'] : [],
    },
    status,
  );
}

/** An upload (scenario file, map file, class raster): read, checked field by field, then run like a band table. */
async function upload(pages: Pages, req: FastifyRequest, reply: FastifyReply) {
  const fail = (p: Problem[], st: number) => listPage(pages, reply, p, st);
  const read = await readUploadParts(req, pages.deps.landscapeUploadBytes);
  if (!read.ok) return fail(read.problems, read.status);
  const got = read.files;
  if (!got.scenario) return fail([{ path: 'scenario', value: undefined, message: 'choose the scenario file (.json)' }], 400);
  let raw: Record<string, unknown>;
  try {
    raw = JSON.parse(got.scenario.bytes.toString('utf8')) as Record<string, unknown>;
  } catch (e) {
    return fail([{ path: 'scenario', value: got.scenario.filename, message: `is not readable JSON (${(e as Error).message})` }], 400);
  }
  let scenario: LandscapeScenario;
  try {
    scenario = parseLandscapeScenario(raw);
  } catch (e) {
    if (e instanceof InputError) return fail(e.problems, 400);
    throw e;
  }
  if (!got.host) return fail([{ path: 'host', value: undefined, message: `choose the map file the scenario names as map.file ("${scenario.map.file}")` }], 400);
  const files: Record<string, Uint8Array> = { [scenario.map.file]: new Uint8Array(got.host.bytes) };
  if (scenario.map.format === 'geotiff' && scenario.map.classes) {
    if (!got.classes) return fail([{ path: 'classes', value: undefined, message: `the scenario names a class raster ("${scenario.map.classes.file}"): choose it too` }], 400);
    files[scenario.map.classes.file] = new Uint8Array(got.classes.bytes);
  }
  return start(pages, reply, raw, files, 'upload', scenario.map.cellM ? `Model cell ${scenario.map.cellM} m, from the scenario.` : 'Model cell from the map file.', fail);
}

type UploadedFiles = Record<string, { filename: string; bytes: Buffer }>;

/** The upload's files by field name, or the problem that stopped the reading (too large, damaged, not multipart). */
async function readUploadParts(req: FastifyRequest, max: number): Promise<{ ok: true; files: UploadedFiles } | { ok: false; problems: Problem[]; status: number }> {
  if (!req.isMultipart()) return { ok: false, problems: [{ path: 'scenario', value: undefined, message: 'choose the scenario file (.json) and the map file to upload' }], status: 400 };
  const got: UploadedFiles = {};
  const tooLarge = (f: MultipartFile) => ({ ok: false as const, problems: [{ path: f.fieldname, value: f.filename, message: `is larger than ${(max / 1048576).toFixed(2)} MB, the most this server accepts for one file` }], status: 413 });
  try {
    for await (const part of req.parts({ limits: { fileSize: max, files: 3, fields: 4, parts: 8 } })) {
      if (part.type !== 'file') continue;
      const f = part as MultipartFile;
      if (!['scenario', 'host', 'classes'].includes(f.fieldname)) {
        await f.toBuffer().catch(() => undefined);
        continue;
      }
      let bytes: Buffer;
      try {
        bytes = await f.toBuffer();
      } catch (e) {
        if ((e as { code?: string }).code === 'FST_REQ_FILE_TOO_LARGE') return tooLarge(f);
        throw e;
      }
      if (f.file.truncated) return tooLarge(f);
      if (bytes.length) got[f.fieldname] = { filename: f.filename, bytes };
    }
  } catch (e) {
    req.log.info({ err: e }, 'damaged map upload');
    return { ok: false, problems: [{ path: 'scenario', value: undefined, message: `the upload arrived incomplete or damaged (${(e as Error).message}); choose the files and upload them again` }], status: 400 };
  }
  return { ok: true, files: got };
}

/** The result page's view: the answer per option first, then the maps, the downloads and the cautions. */
export function resultView(id: string, out: LandscapeOutput) {
  const d = out.doc;
  const unit = (c: { unit: string | null }) => (c.unit ? ` ${c.unit}` : '');
  const baseMap = out.maps[0];
  return {
    title: d.title,
    description: d.description,
    horizonYears: d.horizonYears,
    cellM: d.map.cellM,
    crs: d.map.crs.name,
    pest: d.pest,
    baseline: d.baseline.arrivals.map((a) => ({ site: a.site, fringe: years(a.detectedYears), breeding: years(a.breedingYears) })),
    options: d.options.map((o) => ({
      key: o.key,
      name: o.name,
      verdict: o.verdict.sentence,
      kind: o.verdict.kind,
      wayPast: WAY_PAST[o.wayPast] ?? o.wayPast,
      wayPastSentence: o.wayPastSentence,
      arrivals: o.arrivals.map((a) => {
        const fringe = d.baseline.arrivals.find((b) => b.site === a.site);
        return {
          site: a.site,
          baseline: years(a.baselineYears),
          baselineFringe: years(fringe?.detectedYears ?? null),
          option: years(a.optionYears),
          delay: a.delayYears === null ? (a.optionYears === null && a.baselineYears !== null ? 'at least to the horizon' : '—') : `${a.delayYears >= 0 ? '+' : ''}${a.delayYears.toFixed(1)} yr`,
          sentence: a.sentence,
        };
      }),
      trees: o.treesRemoved.toLocaleString('en-GB'),
      areaHa: o.bandAreaHa.toLocaleString('en-GB'),
      cost: o.cost.total === null ? 'no cost rates given' : `${Math.round(o.cost.total).toLocaleString('en-GB')}${unit(o.cost)}`,
      critical: o.crossSectionCriticalWidthM ? `${Math.round(o.crossSectionCriticalWidthM[0])}–${Math.round(o.crossSectionCriticalWidthM[1])} m` : null,
      pinningVerified: o.pinningVerified,
      transport: transportLine(d, o),
    })),
    baseMap,
    maps: out.maps.slice(1),
    downloads: out.downloads.filter((x) => x.name !== 'briefing.pdf').map((x) => ({ label: x.label, href: `/landscape-runs/${id}/files/${x.name}`, name: x.name })),
    briefing: `/landscape-runs/${id}/files/briefing.pdf`,
    ensemble: ensembleLines(d),
    ensembleKeys: d.ensemble?.options.map((o) => `With ${o.key}`) ?? [],
    cautions: d.cautions,
    notes: d.notes,
    editBands: `/landscape-runs/${id}/bands`,
  };
}
