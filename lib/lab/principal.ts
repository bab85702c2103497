import type { Principal } from "@/lib/auth/machine-tokens";
import type { LabActor } from "@/lib/vocabulary/actor";

/** The lab's actor for a route caller: a signed-in user, or a bench's machine token (actor null, token named in the events). */
export function labActor(caller: Principal): LabActor {
  return caller.machine ? { id: null, machine: { id: caller.machine.id, name: caller.machine.name } } : { id: caller.user.id };
}
