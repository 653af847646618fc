"use client";
// Create or edit a job. Every field has its label, its hint and its error beside it; a refused form keeps
// what was typed.
import Link from "next/link";
import { useActionState, useState } from "react";
import { createJobAction, updateJobAction } from "@/app/(workspace)/jobs/actions";
import { buttonClass, Field, inputClass, quietButtonClass } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import type { JobDetail } from "@/lib/jobs/jobs";
import { BOARD_THICKNESS_MM } from "@/lib/jobs/schema";

interface Options {
  customers: { id: number; name: string }[];
  profiles: { id: number; label: string }[];
}

const described = (name: string, error: unknown) => ({
  "aria-invalid": error ? true : undefined,
  "aria-describedby": error ? `${name}-error` : `${name}-hint`,
});

export function JobForm({ job, options }: { job?: JobDetail; options: Options }) {
  const [state, action, pending] = useActionState(job ? updateJobAction : createJobAction, {});
  const errors = state.fieldErrors ?? {};
  const value = (name: string, fallback: string | number | null | undefined) => state.values?.[name] ?? (fallback === null || fallback === undefined ? "" : String(fallback));
  const [thickness, setThickness] = useState(value("boardThicknessMm", job?.boardThicknessMm));
  const thick = Number(thickness.replace(",", ".")) > BOARD_THICKNESS_MM.usualMax;
  return (
    <form
      // React resets a form after its action; a fresh form takes the echoed values (selects included) as defaults.
      key={JSON.stringify(state.values ?? {})}
      action={action} className="space-y-6" noValidate>
      {state.error && <Notice tone="error">{state.error}</Notice>}
      {job && <input type="hidden" name="jobId" value={job.id} />}
      <fieldset className="grid gap-4 sm:grid-cols-2">
        <legend className="mb-2 text-base font-semibold">The job</legend>
        <Field label="Job number" name="jobNumber" error={errors.jobNumber} hint="As on the works ticket, e.g. WF-24130. Unique in the plant.">
          <input id="jobNumber" name="jobNumber" required maxLength={32} defaultValue={value("jobNumber", job?.jobNumber)} className={`${inputClass} font-mono`} {...described("jobNumber", errors.jobNumber)} />
        </Field>
        <Field label="Customer" name="customerId" error={errors.customerId}>
          <select id="customerId" name="customerId" required defaultValue={value("customerId", job?.customerId)} className={inputClass} {...described("customerId", errors.customerId)}>
            <option value="">Choose a customer…</option>
            {options.customers.map((c) => (
              <option key={c.id} value={c.id}>
                {c.name}
              </option>
            ))}
          </select>
        </Field>
        <div className="sm:col-span-2">
          <Field label="Title" name="title" error={errors.title} hint="The product and the carton, e.g. “Breakfast Blend 40 bags, carton”.">
            <input id="title" name="title" required maxLength={200} defaultValue={value("title", job?.title)} className={inputClass} {...described("title", errors.title)} />
          </Field>
        </div>
      </fieldset>
      <fieldset className="grid gap-4 sm:grid-cols-2">
        <legend className="mb-2 text-base font-semibold">Stock and press</legend>
        <Field label="Stock" name="stock" error={errors.stock} hint="Board grade and weight, e.g. GC1 folding boxboard 300 g/m².">
          <input id="stock" name="stock" maxLength={200} defaultValue={value("stock", job?.stock)} className={inputClass} {...described("stock", errors.stock)} />
        </Field>
        <Field
          label="Board thickness (mm)"
          name="boardThicknessMm"
          error={errors.boardThicknessMm}
          hint={thick ? `Thicker than usual: folding carton board is usually up to about ${BOARD_THICKNESS_MM.usualMax} mm. Check the figure.` : `Folding carton board is usually up to about ${BOARD_THICKNESS_MM.usualMax} mm.`}
        >
          <input
            id="boardThicknessMm"
            name="boardThicknessMm"
            inputMode="decimal"
            value={thickness}
            onChange={(e) => setThickness(e.target.value)}
            className={`${inputClass} ${thick ? "border-caution" : ""}`}
            {...described("boardThicknessMm", errors.boardThicknessMm)}
          />
        </Field>
        <Field label="Press" name="press" error={errors.press} hint="e.g. Sheet-fed offset, 6 colours + coater.">
          <input id="press" name="press" maxLength={100} defaultValue={value("press", job?.press)} className={inputClass} {...described("press", errors.press)} />
        </Field>
        <Field label="Run length (sheets)" name="runLengthSheets" error={errors.runLengthSheets} hint="Leave empty while it is not known.">
          <input id="runLengthSheets" name="runLengthSheets" inputMode="numeric" defaultValue={value("runLengthSheets", job?.runLengthSheets)} className={inputClass} {...described("runLengthSheets", errors.runLengthSheets)} />
        </Field>
      </fieldset>
      <fieldset className="grid gap-4 sm:grid-cols-3">
        <legend className="mb-2 text-base font-semibold">Imposition and tolerance</legend>
        <Field label="Rows of ups" name="upsRows" error={errors.upsRows} hint="Ups down the sheet.">
          <input id="upsRows" name="upsRows" type="number" min={1} max={50} required defaultValue={value("upsRows", job?.upsRows ?? 1)} className={inputClass} {...described("upsRows", errors.upsRows)} />
        </Field>
        <Field label="Columns of ups" name="upsColumns" error={errors.upsColumns} hint="Ups across the sheet.">
          <input id="upsColumns" name="upsColumns" type="number" min={1} max={50} required defaultValue={value("upsColumns", job?.upsColumns ?? 1)} className={inputClass} {...described("upsColumns", errors.upsColumns)} />
        </Field>
        <Field label="Tolerance profile" name="toleranceProfileId" error={errors.toleranceProfileId} hint="The default for this job's scan uploads.">
          <select id="toleranceProfileId" name="toleranceProfileId" defaultValue={value("toleranceProfileId", job?.toleranceProfileId)} className={inputClass} {...described("toleranceProfileId", errors.toleranceProfileId)}>
            <option value="">The plant&apos;s default</option>
            {options.profiles.map((p) => (
              <option key={p.id} value={p.id}>
                {p.label}
              </option>
            ))}
          </select>
        </Field>
      </fieldset>
      {job && <p className="text-xs text-ink-muted">A change to the ups applies to artwork uploaded from now on; revisions already uploaded keep their grid.</p>}
      <div className="flex flex-wrap gap-3">
        <button type="submit" disabled={pending} className={buttonClass}>
          {pending ? "Saving…" : job ? "Save changes" : "Create job"}
        </button>
        <Link href={job ? `/jobs/${job.id}` : "/"} className={quietButtonClass}>
          Cancel
        </Link>
      </div>
    </form>
  );
}
