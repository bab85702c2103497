/** A short human sentence for an event type; unknown types show as they are. */
const PHRASES: Record<string, string> = {
  "user.signed_in": "signed in",
  "user.invited": "invited a user",
  "user.joined": "accepted an invitation",
  "user.roles_changed": "changed roles",
  "user.deactivated": "deactivated a user",
  "user.reactivated": "reactivated a user",
  "user.reset_requested": "asked for a password reset",
  "user.password_reset": "set a new password",
  "user.created": "created a user",
  "model.created": "registered a model",
  "finish.created": "registered a finish",
  "dealer.created": "registered a dealer",
};

export function describeEvent(type: string): string {
  return PHRASES[type] ?? type;
}

/** What an event is about, in words: a code, e-mail or name it carries, else the bare id. */
export function subjectLabel(e: { subjectKind: string; subjectId: string; data: Record<string, unknown> }): string {
  const d = e.data;
  const label = [d.code, d.email, d.name].find((v): v is string => typeof v === "string" && v.length > 0);
  return `${e.subjectKind} ${label ?? e.subjectId}`;
}
