/** Who does a thing: the signed-in user, whose id the server takes from the session. */
export interface Actor {
  id: string;
}

/**
 * Who records a lab measurement: a signed-in user, or a test bench through its machine token (then
 * `id` is null and the token is named in the event's data).
 */
export interface LabActor {
  id: string | null;
  machine?: { id: string; name: string } | null;
}
