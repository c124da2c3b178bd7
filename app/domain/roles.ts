/**
 * Who may do what: the one place for role rules. Services enforce them on every loader and action;
 * the UI only hides what does not apply.
 */
export const ROLES = ["rider", "contributor", "moderator", "admin"] as const;
export type Role = (typeof ROLES)[number];

/** Each role can do everything the roles before it can. */
const RANK: Record<Role, number> = { rider: 1, contributor: 2, moderator: 3, admin: 4 };

export type Action =
  | "garage.save" // save a card or a bike to one's garage
  | "card.check" // mark a card bike-checked
  | "card.report" // report a mistake on a card
  | "submission.create" // propose a new card or an edit
  | "review.work" // work the review queue
  | "admin.roles" // change someone's role
  | "admin.library" // manage makes and families
  | "admin.audit" // read the audit log
  | "admin.outbox"; // read the mail outbox

const NEEDS: Record<Action, Role> = {
  "garage.save": "rider",
  "card.check": "rider",
  "card.report": "rider",
  "submission.create": "contributor",
  "review.work": "moderator",
  "admin.roles": "admin",
  "admin.library": "admin",
  "admin.audit": "admin",
  "admin.outbox": "admin",
};

/** The least role an action needs. */
export function roleNeeded(action: Action): Role {
  return NEEDS[action];
}

/** Whether a role (null: not signed in) may do an action. */
export function can(role: Role | null | undefined, action: Action): boolean {
  return !!role && RANK[role] >= RANK[NEEDS[action]];
}

/** Whether a value is a role. */
export function isRole(value: unknown): value is Role {
  return typeof value === "string" && (ROLES as readonly string[]).includes(value);
}

/** The role a rider has once their e-mail is verified: a verified rider becomes a contributor; others keep theirs. */
export function roleAfterVerification(role: Role): Role {
  return role === "rider" ? "contributor" : role;
}
