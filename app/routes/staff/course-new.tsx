import { data, Form, redirect } from 'react-router';
import { z } from 'zod';
import type { Route } from './+types/course-new';
import { PageHeader } from '#app/components/shells';
import { Button, TextField } from '#app/components/ui';
import { createCourse } from '#app/models/course.server';
import { fieldErrors } from '#app/utils/forms';
import { requireCourseCreator } from '#app/utils/permissions.server';

const NewCourse = z.object({
  title: z.string().trim().min(3, 'Give the course a title of at least 3 characters.').max(160, 'At most 160 characters.'),
  institution: z.string().trim().max(160, 'At most 160 characters.').optional(),
  term: z.string().trim().max(60, 'At most 60 characters.').optional(),
});

export async function loader({ request }: Route.LoaderArgs) {
  await requireCourseCreator(request);
  return null;
}

export async function action({ request }: Route.ActionArgs) {
  const user = await requireCourseCreator(request);
  const form = Object.fromEntries(await request.formData());
  const parsed = NewCourse.safeParse(form);
  if (!parsed.success) return data({ errors: fieldErrors(parsed.error), values: form }, { status: 400 });
  const id = await createCourse(user.id, parsed.data);
  throw redirect(`/courses/${id}`);
}

export default function NewCoursePage({ actionData }: Route.ComponentProps) {
  const e = actionData?.errors ?? {};
  const v = (actionData?.values ?? {}) as Record<string, string>;
  return (
    <>
      <PageHeader title="New course" />
      <Form method="post" className="flex max-w-xl flex-col gap-5" noValidate>
        <TextField
          label="Title"
          name="title"
          required
          defaultValue={v.title}
          error={e.title}
          hint="For example “ECON 214 Strategy and Markets”."
        />
        <TextField label="Institution" name="institution" defaultValue={v.institution} error={e.institution} />
        <TextField label="Term" name="term" defaultValue={v.term} error={e.term} hint="For example “Spring 2027”." />
        <p className="text-slate-700">You will be the course’s instructor. You can invite assistants, researchers and participants next.</p>
        <div>
          <Button type="submit">Create course</Button>
        </div>
      </Form>
    </>
  );
}

export const meta: Route.MetaFunction = () => [{ title: 'New course · Parley' }];
