import Papa from 'papaparse';
import { data, Form, Link, useNavigation } from 'react-router';
import { z } from 'zod';
import type { Route } from './+types/datasets';
import { DataTable, staffColumnHelper } from '#app/components/data-table';
import { CourseCrumbs, PageHeader } from '#app/components/shells';
import { CsvFileField, LineIssues } from '#app/components/upload';
import { Button, Notice, RowAction, TextField } from '#app/components/ui';
import { buildPanel, type PanelIssue } from '#app/lib/panel';
import { type ColumnMap, PARLEY_COLUMNS, parseChoiceCsv } from '#app/lib/panel-csv';
import { createDataset, DATASET_LIMITS, deleteDataset, listDatasets } from '#app/models/datasets.server';
import { formatDate } from '#app/utils/format';
import { requireCourseRole } from '#app/utils/permissions.server';

const FIELDS = Object.keys(PARLEY_COLUMNS) as (keyof ColumnMap)[];
const FIELD_WORDS: Record<keyof ColumnMap, string> = {
  session: 'Session',
  treatment: 'Treatment',
  subject: 'Participant (pseudonym)',
  partner: 'Partner',
  supergame: 'Supergame',
  round: 'Round',
  action: 'Action (C/D or 1/0)',
  partnerAction: 'Partner’s action (C/D or 1/0)',
};

const Upload = z.object({
  intent: z.literal('upload'),
  name: z.string().trim().max(160, 'Keep the name to 160 characters.').optional(),
  ...Object.fromEntries(FIELDS.map((f) => [`map_${f}`, z.string().trim().max(200).optional()])),
});
const Delete = z.object({ intent: z.literal('delete'), id: z.coerce.number().int().positive() });

export async function loader({ request, params }: Route.LoaderArgs) {
  const { course } = await requireCourseRole(request, params.courseId, ['instructor', 'researcher']);
  return { course, datasets: await listDatasets(course.id), limits: DATASET_LIMITS };
}

interface UploadOutcome {
  ok: boolean;
  message: string | null;
  fileName: string;
  /** the file's header when columns must be mapped */
  header: string[] | null;
  map: Partial<ColumnMap>;
  errors: PanelIssue[];
  errorCount: number;
  warnings: PanelIssue[];
}

const MB = 1024 * 1024;

export async function action({ request, params }: Route.ActionArgs) {
  const { course, user } = await requireCourseRole(request, params.courseId, ['instructor', 'researcher']);
  const blank: UploadOutcome = { ok: false, message: null, fileName: '', header: null, map: {}, errors: [], errorCount: 0, warnings: [] };
  const outcome = (o: Partial<UploadOutcome>, status = 400) => data({ ...blank, ...o } satisfies UploadOutcome, { status });
  const tooBig = `The file is larger than ${DATASET_LIMITS.maxBytes / MB} MB. Split it by session, or leave out the columns estimation does not need.`;
  if (Number(request.headers.get('content-length') ?? 0) > DATASET_LIMITS.maxBytes + 64 * 1024) return outcome({ message: tooBig }, 413);
  const form = await request.formData();

  if (form.get('intent') === 'delete') {
    const parsed = Delete.safeParse(Object.fromEntries(form));
    if (!parsed.success) return outcome({ message: 'Unknown dataset.' });
    if (!(await deleteDataset(course.id, parsed.data.id))) return outcome({ message: 'That dataset is not in this course.' }, 404);
    return { ...blank, ok: true, message: 'Dataset deleted.' } satisfies UploadOutcome;
  }

  const parsed = Upload.safeParse(Object.fromEntries([...form].filter(([, v]) => typeof v === 'string')));
  if (!parsed.success) return outcome({ message: parsed.error.issues[0].message });
  const file = form.get('file');
  if (!(file instanceof File) || file.size === 0) return outcome({ message: 'Choose a CSV file of choices.' });
  if (file.size > DATASET_LIMITS.maxBytes) return outcome({ message: tooBig, fileName: file.name }, 413);
  const text = await file.text();
  if (text.includes('\uFFFD'))
    return outcome({ message: 'The file is not UTF-8 text. Save it as “CSV UTF-8” and upload it again.', fileName: file.name });

  const input = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  const header = (Papa.parse<string[]>(input, { preview: 1 }).data[0] ?? []).map((h) => h.trim());
  const values = parsed.data as Record<string, string | undefined>;
  const map: Partial<ColumnMap> = {};
  for (const f of FIELDS) if (values[`map_${f}`]) map[f] = values[`map_${f}`];
  const missing = FIELDS.filter((f) => !header.includes(map[f] ?? PARLEY_COLUMNS[f]));
  if (missing.length) {
    return outcome({
      fileName: file.name,
      header,
      map,
      message: `Match the file’s columns to the panel’s: ${missing.map((f) => `“${FIELD_WORDS[f]}”`).join(', ')} ${missing.length === 1 ? 'is' : 'are'} not in the file under Parley’s name. Choose the file again if your browser cleared it.`,
    });
  }

  const rows = parseChoiceCsv(text, map);
  if (rows.rows.length + rows.errors.length > DATASET_LIMITS.maxRows) {
    return outcome(
      {
        fileName: file.name,
        message: `The file has more than ${DATASET_LIMITS.maxRows.toLocaleString('en-GB')} rows. Split it (for example by session) and upload the parts as separate datasets.`,
      },
      413,
    );
  }
  const built = buildPanel(rows.rows);
  const errors = [...rows.errors, ...built.errors].sort((a, b) => (a.line ?? 0) - (b.line ?? 0));
  if (errors.length) {
    return outcome({
      fileName: file.name,
      header,
      map,
      errors: errors.slice(0, 200),
      errorCount: errors.length,
      warnings: built.warnings.slice(0, 50),
    });
  }
  const name = parsed.data.name || file.name.replace(/\.csv$/i, '');
  await createDataset(course.id, user.id, name.slice(0, 160), rows.rows);
  return {
    ok: true,
    message: `“${name}” stored: ${rows.rows.length.toLocaleString('en-GB')} choices of ${built.panel.subjects.length} participants. Estimation can use it now.`,
    fileName: file.name,
    header: null,
    map: {},
    errors: [],
    errorCount: 0,
    warnings: built.warnings.slice(0, 50),
  } satisfies UploadOutcome;
}

type DatasetRow = Route.ComponentProps['loaderData']['datasets'][number];
const col = staffColumnHelper<DatasetRow>();
const columns = col.columns([
  col.accessor('name', {
    header: 'Name',
    cell: (i) => (
      <span className="flex flex-wrap items-center gap-3">
        <span className="font-semibold">{i.getValue()}</span>
        <Link
          to={`./${i.row.original.id}/estimate`}
          relative="path"
          className="font-semibold text-accent-700 underline-offset-4 hover:underline"
        >
          Estimate strategies<span className="sr-only"> in {i.getValue()}</span>
        </Link>
      </span>
    ),
  }),
  col.accessor('rowCount', {
    header: 'Choices',
    meta: { align: 'right' },
    sortFn: 'basic',
    cell: (i) => `${i.getValue().toLocaleString('en-GB')} rows`,
  }),
  col.accessor('createdAt', { header: 'Uploaded', sortFn: 'datetime', cell: (i) => formatDate(i.getValue()) }),
  col.accessor('by', { header: 'By' }),
  col.display({
    id: 'actions',
    header: () => <span className="sr-only">Actions</span>,
    cell: (i) => (
      <RowAction
        fields={{ intent: 'delete', id: i.row.original.id }}
        label="Delete"
        target={i.row.original.name}
        confirmText={`Delete the dataset “${i.row.original.name}”?`}
      />
    ),
  }),
]);

export default function Datasets({ loaderData, actionData }: Route.ComponentProps) {
  const { course, datasets, limits } = loaderData;
  const nav = useNavigation();
  const header = actionData?.header ?? null;
  return (
    <>
      <PageHeader
        title="Uploaded panels"
        eyebrow={<CourseCrumbs course={course} trail={[{ to: `/courses/${course.id}/data`, label: 'Data' }]} />}
      />
      <section aria-labelledby="upload" className="mb-8 max-w-3xl rounded-lg border border-slate-200 bg-white p-4">
        <h2 id="upload" className="mb-2 text-lg font-semibold">
          Upload a choice panel
        </h2>
        <p className="mb-3 text-slate-700">
          A CSV with one row per participant × supergame × round, in Parley’s own export format (columns <code>session</code>,{' '}
          <code>treatment</code>, <code>pseudonym</code>, <code>partner</code>, <code>supergame</code>, <code>round</code>,{' '}
          <code>action</code>, <code>partner_action</code>; others are ignored) or with your own column names, which you match below. Every
          line is checked; a file with any bad line is not stored. At most {limits.maxBytes / MB} MB and{' '}
          {limits.maxRows.toLocaleString('en-GB')} rows. Research use of data from elsewhere follows its own ethics approval and consent.
        </p>
        <Form method="post" encType="multipart/form-data" className="flex flex-col gap-4">
          <input type="hidden" name="intent" value="upload" />
          <div className="flex flex-wrap items-end gap-3">
            <CsvFileField label="Panel file (CSV)" />
            <TextField
              label="Name (optional)"
              name="name"
              className="min-w-64 flex-1"
              hint="Shown when you choose data for an estimation."
            />
          </div>
          {header ? (
            <fieldset className="rounded-lg border border-slate-200 p-3">
              <legend className="px-1 font-semibold text-slate-800">Which column holds what?</legend>
              <div className="grid gap-3 sm:grid-cols-2">
                {FIELDS.map((f) => (
                  <div key={f} className="flex flex-col gap-1">
                    <label htmlFor={`map-${f}`} className="font-semibold text-slate-800">
                      {FIELD_WORDS[f]}
                    </label>
                    <select
                      id={`map-${f}`}
                      name={`map_${f}`}
                      defaultValue={
                        (actionData?.map as Partial<ColumnMap> | undefined)?.[f] ??
                        (header.includes(PARLEY_COLUMNS[f]) ? PARLEY_COLUMNS[f] : '')
                      }
                      className="min-h-11 rounded-lg border border-slate-300 bg-white px-2"
                    >
                      <option value="">— choose a column —</option>
                      {header.map((h) => (
                        <option key={h} value={h}>
                          {h}
                        </option>
                      ))}
                    </select>
                  </div>
                ))}
              </div>
            </fieldset>
          ) : null}
          <div>
            <Button type="submit" disabled={nav.state === 'submitting'}>
              Check and store
            </Button>
          </div>
        </Form>
      </section>

      <div aria-live="polite" className="mb-6 flex max-w-3xl flex-col gap-3">
        {actionData?.ok && actionData.message ? <Notice tone="ok">{actionData.message}</Notice> : null}
        {actionData && !actionData.ok && actionData.message ? <Notice tone="error">{actionData.message}</Notice> : null}
        {actionData && actionData.errorCount > 0 ? (
          <LineIssues issues={actionData.errors} total={actionData.errorCount} fileName={actionData.fileName} verb="stored" />
        ) : null}
        {actionData && actionData.warnings.length > 0 ? (
          <Notice tone="warn" title="Worth a look">
            <ul className="flex flex-col gap-1">
              {actionData.warnings.map((w, i) => (
                <li key={i}>
                  {w.line === null ? '' : `Line ${w.line}: `}
                  {w.message}
                </li>
              ))}
            </ul>
          </Notice>
        ) : null}
      </div>

      <section aria-labelledby="stored">
        <h2 id="stored" className="mb-3 text-lg font-semibold">
          Stored datasets
        </h2>
        <DataTable
          columns={columns}
          data={datasets}
          caption="Uploaded datasets"
          filterLabel="Filter datasets"
          empty="No panel uploaded yet."
        />
      </section>
    </>
  );
}

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Uploaded panels · ${data?.course.title ?? 'Course'} · Parley` }];
