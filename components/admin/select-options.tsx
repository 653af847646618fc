import { ROLE_LABELS, ROLES } from "@/lib/auth/policy";

/** The role choices of every user form, in policy order. */
export function RoleOptions() {
  return ROLES.map((r) => (
    <option key={r} value={r}>
      {ROLE_LABELS[r]}
    </option>
  ));
}

/** The customers a customer user can belong to, after a placeholder that cannot be chosen. */
export function CustomerOptions({ customers, placeholder }: { customers: { id: number; name: string }[]; placeholder: string }) {
  return (
    <>
      <option value="" disabled>
        {placeholder}
      </option>
      {customers.map((c) => (
        <option key={c.id} value={c.id}>
          {c.name}
        </option>
      ))}
    </>
  );
}
