import { z } from "zod";
import { ROLES } from "@/lib/auth/roles";
import { stringList } from "@/lib/forms";
import { emailAddress } from "@/lib/input/email";

const roleList = stringList(z.enum(ROLES, { error: "Pick roles from the list." }));

export const inviteSchema = z.object({
  name: z.string().trim().min(2, "Enter the person's name.").max(120, "Keep the name under 120 characters."),
  email: emailAddress("Enter the person's e-mail address."),
  roles: roleList.refine((r) => r.length > 0, "Give at least one role."),
});

export const setRolesSchema = z.object({
  userId: z.string().min(1),
  roles: roleList,
  reason: z.string().trim().max(500).optional(),
});

export const userIdSchema = z.object({
  userId: z.string().min(1),
  reason: z.string().trim().max(500).optional(),
});
