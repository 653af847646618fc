"use client";
// Create or edit a customer: its name and the addresses told of sign-offs.
import Link from "next/link";
import { useActionState } from "react";
import { createCustomerAction, updateCustomerAction } from "@/app/(workspace)/customers/actions";
import { buttonClass, Field, inputClass, quietButtonClass } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import type { CustomerDetail } from "@/lib/customers/customers";
import { MAX_CONTACT_EMAILS } from "@/lib/customers/schema";

export function CustomerForm({ customer }: { customer?: CustomerDetail }) {
  const [state, action, pending] = useActionState(customer ? updateCustomerAction : createCustomerAction, {});
  const errors = state.fieldErrors ?? {};
  // A bad address is reported as contactEmails.N; the field shows the first such message.
  const emailError = Object.entries(errors).find(([k]) => k.startsWith("contactEmails"))?.[1];
  return (
    <form
      // React resets a form after its action; a fresh form takes the echoed values (selects included) as defaults.
      key={JSON.stringify(state.values ?? {})}
      action={action} className="space-y-4" noValidate>
      {state.error && <Notice tone="error">{state.error}</Notice>}
      {customer && <input type="hidden" name="customerId" value={customer.id} />}
      <Field label="Name" name="name" error={errors.name} hint="The brand owner as it appears on the order.">
        <input
          id="name"
          name="name"
          required
          maxLength={200}
          defaultValue={state.values?.name ?? customer?.name ?? ""}
          className={inputClass}
          aria-invalid={errors.name ? true : undefined}
          aria-describedby={errors.name ? "name-error" : "name-hint"}
        />
      </Field>
      <Field label="Contact e-mails for notices" name="contactEmails" error={emailError} hint={`One address a line (or separated by commas), up to ${MAX_CONTACT_EMAILS}. They are e-mailed when a sheet of their jobs is signed off.`}>
        <textarea
          id="contactEmails"
          name="contactEmails"
          rows={4}
          defaultValue={state.values?.contactEmails ?? customer?.contactEmails.join("\n") ?? ""}
          className={`${inputClass} font-mono`}
          aria-invalid={emailError ? true : undefined}
          aria-describedby={emailError ? "contactEmails-error" : "contactEmails-hint"}
        />
      </Field>
      <div className="flex flex-wrap gap-3">
        <button type="submit" disabled={pending} className={buttonClass}>
          {pending ? "Saving…" : customer ? "Save changes" : "Create customer"}
        </button>
        <Link href="/customers" className={quietButtonClass}>
          Cancel
        </Link>
      </div>
    </form>
  );
}
