import { data, Form, useNavigation } from 'react-router';
import { z } from 'zod';
import type { Route } from './+types/members';
import { DataTable, staffColumnHelper } from '#app/components/data-table';
import { CourseCrumbs, PageHeader } from '#app/components/shells';
import { Button, Notice, RowAction, SelectField, TextField, EmailAddress } from '#app/components/ui';
import {
  changeMemberRole,
  createInvitation,
  findPendingInvitation,
  listMembers,
  listPendingInvitations,
  markInvitationSent,
  reissueInvitation,
  releaseCourseMail,
  reserveCourseMails,
  revokeInvitation,
} from '#app/models/course.server';
import type { CurrentUser } from '#app/utils/auth.server';
import { env } from '#app/utils/env.server';
import { sockets } from '#app/utils/sockets.server';
import { fieldErrors } from '#app/utils/forms';
import { formatDate, ROLE_WORDS } from '#app/utils/format';
import { invitationMail, MailNotSentError, sendMail } from '#app/utils/mail.server';
import { requireCourseRole } from '#app/utils/permissions.server';
import { COURSE_ROLES, type CourseRole, INVITATION_DAYS } from '#app/utils/roles';

const Role = z.enum(COURSE_ROLES, 'Choose a role.');
const Id = z.coerce.number().int().positive();
const MemberAction = z.discriminatedUnion('intent', [
  z.object({ intent: z.literal('invite'), email: z.email('Enter an e-mail address such as name@university.edu.').max(254), role: Role }),
  z.object({ intent: z.literal('change-role'), memberId: Id, role: Role }),
  z.object({ intent: z.literal('remove'), memberId: Id }),
  z.object({ intent: z.literal('revoke'), invitationId: Id }),
  z.object({ intent: z.literal('resend'), invitationId: Id }),
]);

/**
 * Sends an invitation's mail on a reserved place of the course's daily cap: marks it sent, or
 * gives the place back and leaves it "not sent" (shown with a Resend button) when the mail fails.
 */
async function sendInvitation(
  course: { id: number; title: string },
  user: CurrentUser,
  inv: { invitationId: number; token: string; email: string; role: CourseRole },
  reservationId: number,
): Promise<boolean> {
  try {
    await sendMail(
      invitationMail({
        to: inv.email,
        courseTitle: course.title,
        role: inv.role,
        inviter: user,
        link: new URL(`/invitations/${inv.token}`, env().APP_URL).toString(),
        days: INVITATION_DAYS,
      }),
    );
  } catch (error) {
    if (!(error instanceof MailNotSentError)) throw error;
    await releaseCourseMail(reservationId);
    return false;
  }
  await markInvitationSent(inv.invitationId);
  return true;
}

export async function loader({ request, params }: Route.LoaderArgs) {
  // Researchers work with de-identified data only, so the roster of names is not theirs to see.
  const { course, role, user } = await requireCourseRole(request, params.courseId, ['instructor', 'assistant']);
  const [members, invitations] = await Promise.all([listMembers(course.id), listPendingInvitations(course.id)]);
  return { course, canManage: role === 'instructor', me: user.id, members, invitations };
}

export async function action({ request, params }: Route.ActionArgs) {
  const { course, user } = await requireCourseRole(request, params.courseId, ['instructor']);
  const form = Object.fromEntries(await request.formData());
  const parsed = MemberAction.safeParse(form);
  if (!parsed.success) {
    return data(
      { ok: false as const, intent: String(form.intent ?? ''), errors: fieldErrors(parsed.error), values: form, message: null },
      { status: 400 },
    );
  }
  const a = parsed.data;
  const fail = (message: string, status: number) =>
    data({ ok: false as const, intent: a.intent, errors: {} as Record<string, string>, values: form, message }, { status });
  const capReached = () =>
    fail(
      `This course has reached its limit of at most ${env().INVITES_PER_COURSE_PER_DAY} invitation e-mails a day (invitations and roster e-mails together, over the last 24 hours). Nothing was sent; try again later.`,
      429,
    );
  const notSent = (email: string) =>
    fail(`We could not send the e-mail to ${email}. The invitation is listed below as not sent: try again with Resend in a moment.`, 503);
  switch (a.intent) {
    case 'invite': {
      const email = a.email.toLowerCase();
      const [reservation] = await reserveCourseMails(course.id, user.id, 'invitation', [email]);
      if (reservation === undefined) return capReached();
      const res = await createInvitation(course.id, email, a.role, user.id);
      if (!res.ok) {
        await releaseCourseMail(reservation);
        return data(
          { ok: false as const, intent: a.intent, errors: { [res.field]: res.message }, values: form, message: null },
          { status: 400 },
        );
      }
      if (!(await sendInvitation(course, user, { ...res, email, role: a.role }, reservation))) return notSent(email);
      return { ok: true as const, intent: a.intent, message: `Invitation sent to ${email}.` };
    }
    case 'resend': {
      const inv = await findPendingInvitation(course.id, a.invitationId);
      if (!inv) return fail('That invitation is not pending in this course.', 404);
      const [reservation] = await reserveCourseMails(course.id, user.id, 'invitation', [inv.email]);
      if (reservation === undefined) return capReached();
      const token = await reissueInvitation(course.id, inv.id);
      if (!token) {
        await releaseCourseMail(reservation);
        return fail('That invitation is not pending in this course.', 404);
      }
      if (!(await sendInvitation(course, user, { invitationId: inv.id, token, email: inv.email, role: inv.role }, reservation)))
        return notSent(inv.email);
      return { ok: true as const, intent: a.intent, message: `Invitation sent again to ${inv.email}.` };
    }
    case 'change-role':
    case 'remove': {
      const res = await changeMemberRole(course.id, a.memberId, a.intent === 'remove' ? null : a.role);
      if (!res.ok) return fail(res.message, res.status);
      // Live pages of that person reconnect and are authorised under the new role (or refused).
      sockets().dropUser(res.userId);
      return { ok: true as const, intent: a.intent, message: a.intent === 'remove' ? 'Member removed.' : 'Role changed.' };
    }
    case 'revoke': {
      if (!(await revokeInvitation(course.id, a.invitationId))) return fail('That invitation is not pending in this course.', 404);
      return { ok: true as const, intent: a.intent, message: 'Invitation withdrawn.' };
    }
  }
}

const roleOptions = COURSE_ROLES.map((r) => ({ value: r, label: ROLE_WORDS[r] }));

type MemberRow = Route.ComponentProps['loaderData']['members'][number];

function columnsFor(canManage: boolean, me: number) {
  const col = staffColumnHelper<MemberRow>();
  return col.columns([
    col.accessor('email', { header: 'E-mail', cell: (i) => <EmailAddress email={i.getValue()} /> }),
    col.accessor('name', { header: 'Name', cell: (i) => i.getValue() ?? '—' }),
    col.accessor('studentId', { header: 'Student id', cell: (i) => i.getValue() ?? '—' }),
    col.accessor('role', {
      header: 'Role',
      cell: (i) =>
        canManage ? (
          <Form method="post" className="flex items-center gap-2">
            <input type="hidden" name="intent" value="change-role" />
            <input type="hidden" name="memberId" value={i.row.original.memberId} />
            <label className="sr-only" htmlFor={`role-${i.row.original.memberId}`}>
              Role of {i.row.original.email}
            </label>
            <select
              id={`role-${i.row.original.memberId}`}
              name="role"
              defaultValue={i.getValue()}
              className="min-h-9 rounded border border-slate-300 bg-white px-2"
            >
              {roleOptions.map((o) => (
                <option key={o.value} value={o.value}>
                  {o.label}
                </option>
              ))}
            </select>
            <button type="submit" className="min-h-9 rounded px-2 font-semibold text-accent-700 hover:bg-accent-50">
              Save<span className="sr-only"> role of {i.row.original.email}</span>
            </button>
          </Form>
        ) : (
          ROLE_WORDS[i.getValue()]
        ),
    }),
    col.accessor('joinedAt', { header: 'Joined', cell: (i) => formatDate(i.getValue()), sortFn: 'datetime' }),
    ...(canManage
      ? [
          col.display({
            id: 'actions',
            header: () => <span className="sr-only">Actions</span>,
            cell: (i) => (
              <RowAction
                fields={{ intent: 'remove', memberId: i.row.original.memberId }}
                label="Remove"
                target={i.row.original.email}
                confirmText={`Remove ${i.row.original.userId === me ? 'yourself' : i.row.original.email} from this course?`}
              />
            ),
          }),
        ]
      : []),
  ]);
}

export default function Members({ loaderData, actionData }: Route.ComponentProps) {
  const { course, canManage, members, invitations, me } = loaderData;
  const nav = useNavigation();
  const inviteErrors: Record<string, string | undefined> =
    actionData && !actionData.ok && actionData.intent === 'invite' ? actionData.errors : {};
  const values: Record<string, string | undefined> = actionData && !actionData.ok ? (actionData.values as Record<string, string>) : {};
  return (
    <>
      <PageHeader title="Members" eyebrow={<CourseCrumbs course={course} />} />
      <div className="mb-4 flex flex-col gap-3" aria-live="polite">
        {actionData?.ok ? <Notice tone="ok">{actionData.message}</Notice> : null}
        {actionData && !actionData.ok && actionData.message ? <Notice tone="error">{actionData.message}</Notice> : null}
      </div>
      {canManage ? (
        <section aria-labelledby="invite" className="mb-8 max-w-3xl rounded-lg border border-slate-200 bg-white p-4">
          <h2 id="invite" className="mb-3 text-lg font-semibold">
            Invite by e-mail
          </h2>
          <Form
            method="post"
            className="flex flex-wrap items-start gap-3"
            noValidate
            key={actionData?.ok && actionData.intent === 'invite' ? actionData.message : 'invite'}
          >
            <input type="hidden" name="intent" value="invite" />
            <TextField
              label="E-mail address"
              name="email"
              type="email"
              autoComplete="off"
              className="min-w-72 flex-1"
              defaultValue={values.email}
              error={inviteErrors.email}
            />
            <SelectField
              label="Role"
              name="role"
              options={roleOptions}
              defaultValue={values.role ?? 'assistant'}
              error={inviteErrors.role}
            />
            <Button type="submit" className="mt-7" disabled={nav.state === 'submitting'}>
              Send invitation
            </Button>
          </Form>
          <p className="mt-2 text-sm text-slate-600">
            The invitation is valid for {INVITATION_DAYS} days. The person signs in with a code sent to that address.
          </p>
        </section>
      ) : null}
      <section aria-labelledby="member-list" className="mb-8">
        <h2 id="member-list" className="mb-3 text-lg font-semibold">
          {members.length} members
        </h2>
        <DataTable
          columns={columnsFor(canManage, me)}
          data={members}
          caption="Course members"
          filterLabel="Filter members"
          initialSorting={[{ id: 'email', desc: false }]}
        />
      </section>
      {invitations.length > 0 ? (
        <section aria-labelledby="pending">
          <h2 id="pending" className="mb-3 text-lg font-semibold">
            Pending invitations
          </h2>
          <ul className="flex max-w-3xl flex-col divide-y divide-slate-100 rounded-lg border border-slate-200 bg-white">
            {invitations.map((inv) => (
              <li key={inv.id} className="flex flex-wrap items-center justify-between gap-2 px-4 py-2">
                <span>
                  <EmailAddress email={inv.email} /> · {ROLE_WORDS[inv.role]} ·{' '}
                  {inv.sentAt ? (
                    `until ${formatDate(inv.expiresAt)}`
                  ) : (
                    <strong className="text-danger-600">
                      not sent <span aria-hidden="true">⚠</span>
                    </strong>
                  )}
                </span>
                {canManage ? (
                  <span className="flex items-center gap-1">
                    {inv.sentAt ? null : (
                      <RowAction
                        fields={{ intent: 'resend', invitationId: inv.id }}
                        label="Resend"
                        target={`invitation to ${inv.email}`}
                        tone="quiet"
                      />
                    )}
                    <Form method="post">
                      <input type="hidden" name="intent" value="revoke" />
                      <input type="hidden" name="invitationId" value={inv.id} />
                      <button className="min-h-9 rounded px-2 font-semibold text-danger-600 hover:bg-danger-50">
                        Withdraw<span className="sr-only"> invitation to {inv.email}</span>
                      </button>
                    </Form>
                  </span>
                ) : null}
              </li>
            ))}
          </ul>
        </section>
      ) : null}
    </>
  );
}

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Members · ${data?.course.title ?? 'Course'} · Parley` }];
