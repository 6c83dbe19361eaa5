/** Roles a member can hold in a course (product.md "Roles"). Site admins come from ADMIN_EMAILS. */
export const COURSE_ROLES = ['instructor', 'assistant', 'researcher', 'participant'] as const;
export type CourseRole = (typeof COURSE_ROLES)[number];

/** How long an e-mailed invitation to a course stays valid. */
export const INVITATION_DAYS = 14;
