import type { Route } from './+types/dataset-estimate';
import { EstimateProgress, EstimateResults, EstimationForm, StoredEstimates, useEstimateRun } from '#app/components/estimation-panel';
import { CourseCrumbs, PageHeader } from '#app/components/shells';
import { listDatasets } from '#app/models/datasets.server';
import { estimatesForDataset, getEstimate } from '#app/models/estimate.server';
import { parseId, respondUnless } from '#app/utils/http.server';
import { requireCourseRole } from '#app/utils/permissions.server';

// Strategy-frequency estimation on an uploaded choice panel (another lab's, a published one),
// through the same request, workers and storage as the Debrief's.
export async function loader({ request, params }: Route.LoaderArgs) {
  // the roles that may upload panels (the datasets page) may estimate on them
  const { course } = await requireCourseRole(request, params.courseId, ['instructor', 'researcher']);
  const datasetId = parseId(params.datasetId, 'dataset');
  const dataset = (await listDatasets(course.id)).find((d) => d.id === datasetId);
  respondUnless(dataset, 404, 'No such dataset in this course.');
  const estimates = await estimatesForDataset(course.id, datasetId);
  const wanted = Number(new URL(request.url).searchParams.get('estimate'));
  const current = (wanted && (await getEstimate(course.id, wanted))) || estimates[0] || null;
  return { course, dataset: { id: dataset.id, name: dataset.name, rowCount: dataset.rowCount }, estimates, current };
}

export default function DatasetEstimate({ loaderData }: Route.ComponentProps) {
  const { course, dataset, estimates, current } = loaderData;
  const run = useEstimateRun(course.id, current);
  const estimate = run.current;
  return (
    <>
      <PageHeader
        title={`Strategies in ${dataset.name}`}
        eyebrow={<CourseCrumbs course={course} trail={[{ to: `/courses/${course.id}/datasets`, label: 'Uploaded panels' }]} />}
      />
      <section aria-labelledby="estimation" className="flex flex-col gap-4 rounded-lg border border-slate-200 bg-white p-4">
        <h2 id="estimation" className="text-xl font-semibold">
          Strategy-frequency estimation
        </h2>
        <p className="max-w-3xl text-slate-700">
          {dataset.rowCount.toLocaleString('en')} choices, estimated per treatment of the uploaded panel (Dal Bó &amp; Fréchette 2011): each
          subject follows one strategy of the set with occasional slips; standard errors from a bootstrap over subjects on worker threads.
          The result is stored.
        </p>
        <EstimationForm courseId={course.id} datasetId={dataset.id} start={run.start} />
        {estimate ? (
          <div className="flex flex-col gap-4 border-t border-slate-200 pt-4">
            <h3 className="font-semibold">{`Estimation #${estimate.id}: ${estimate.request.strategies.join(', ')}; B = ${estimate.request.bootstrap}, seed ${estimate.request.seed}`}</h3>
            <EstimateProgress estimate={estimate} />
            {estimate.status === 'done' ? (
              <EstimateResults estimate={estimate} csvHref={`/courses/${course.id}/debrief/csv/strategies?estimate=${estimate.id}`} />
            ) : null}
          </div>
        ) : null}
        <StoredEstimates
          estimates={estimates}
          currentId={estimate?.id ?? null}
          basePath={`/courses/${course.id}/datasets/${dataset.id}/estimate?`}
        />
      </section>
    </>
  );
}

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Strategies in ${data?.dataset.name ?? 'dataset'} · Parley` }];
