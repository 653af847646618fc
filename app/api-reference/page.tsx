// The API reference for people: the OpenAPI document rendered on the server as plain HTML (no client script).
import type { Metadata } from "next";
import Link from "next/link";
import { Logo } from "@/components/logo";
import { openApiDocument } from "@/lib/api/openapi";

export const metadata: Metadata = { title: "API reference" };

type Schema = { type?: string | string[]; $ref?: string; properties?: Record<string, Schema>; required?: string[]; items?: Schema; enum?: unknown[]; description?: string; anyOf?: Schema[]; format?: string };

const refName = (ref: string) => ref.split("/").at(-1) ?? ref;

function typeOf(schema: Schema | undefined): string {
  if (!schema) return "";
  if (schema.$ref) return refName(schema.$ref);
  if (schema.anyOf) return schema.anyOf.map(typeOf).join(" | ");
  if (schema.enum) return schema.enum.map((v) => JSON.stringify(v)).join(" | ");
  if (schema.type === "array") return `${typeOf(schema.items)}[]`;
  const base = Array.isArray(schema.type) ? schema.type.join(" | ") : (schema.type ?? "object");
  return schema.format ? `${base} (${schema.format})` : base;
}

function Properties({ schema }: { schema: Schema }) {
  const props = Object.entries(schema.properties ?? {});
  if (props.length === 0) return <p className="text-sm text-ink-muted">{typeOf(schema)}</p>;
  return (
    <table className="w-full text-left text-sm">
      <tbody className="divide-y divide-rule">
        {props.map(([name, p]) => (
          <tr key={name}>
            <td className="py-1.5 pr-4 align-top font-mono text-xs">
              {name}
              {schema.required?.includes(name) ? "" : "?"}
            </td>
            <td className="py-1.5 pr-4 align-top font-mono text-xs text-accent-strong">{typeOf(p)}</td>
            <td className="py-1.5 align-top text-xs text-ink-muted">{p.description}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}

export default function ApiReferencePage() {
  const doc = openApiDocument() as unknown as {
    info: { title: string; description: string };
    paths: Record<string, Record<string, { summary: string; parameters?: { name: string; in: string; description?: string }[]; requestBody?: { content: Record<string, { schema: Schema }> }; responses: Record<string, { description: string; content?: Record<string, { schema: Schema }> }> }>>;
    components: { schemas: Record<string, Schema> };
  };
  return (
    <div className="mx-auto max-w-5xl space-y-8 px-4 py-8 sm:px-6">
      <header className="flex flex-wrap items-center gap-4">
        <Link href="/" aria-label="Tympan">
          <Logo />
        </Link>
        <h1 className="text-2xl font-semibold tracking-tight">{doc.info.title}</h1>
        <a className="ml-auto text-sm text-accent-strong underline" href="/api/v1/openapi.json">
          openapi.json
        </a>
      </header>
      <p className="max-w-3xl text-sm text-ink-muted">{doc.info.description}</p>
      <section className="space-y-4" aria-labelledby="operations">
        <h2 id="operations" className="text-lg font-semibold">Operations</h2>
        {Object.entries(doc.paths).flatMap(([path, methods]) =>
          Object.entries(methods).map(([method, op]) => (
            <article key={`${method} ${path}`} className="rounded-xl border border-rule bg-surface p-5 shadow-sm">
              <h3 className="break-all font-mono text-sm">
                <span className="mr-2 rounded bg-accent-soft px-1.5 py-0.5 font-semibold uppercase text-accent-strong">{method}</span>
                {path}
              </h3>
              <p className="mt-2 text-sm">{op.summary}</p>
              {op.parameters && op.parameters.length > 0 && (
                <p className="mt-2 text-xs text-ink-muted">
                  Parameters: {op.parameters.map((p) => `${p.name} (${p.in})`).join(", ")}
                </p>
              )}
              {op.requestBody &&
                Object.entries(op.requestBody.content).map(([type, body]) => (
                  <div key={type} className="mt-3">
                    <div className="text-xs font-medium">Body: {type}</div>
                    <Properties schema={body.schema.$ref ? doc.components.schemas[refName(body.schema.$ref)] : body.schema} />
                  </div>
                ))}
              <ul className="mt-3 space-y-0.5 text-xs">
                {Object.entries(op.responses).map(([status, r]) => (
                  <li key={status}>
                    <span className="font-mono font-semibold">{status}</span> {r.description}
                    {r.content?.["application/json"] && <span className="font-mono text-ink-muted"> → {typeOf(r.content["application/json"].schema)}</span>}
                  </li>
                ))}
              </ul>
            </article>
          )),
        )}
      </section>
      <section className="space-y-4" aria-labelledby="schemas">
        <h2 id="schemas" className="text-lg font-semibold">Objects</h2>
        {Object.entries(doc.components.schemas).map(([name, schema]) => (
          <article key={name} id={name} className="rounded-xl border border-rule bg-surface p-5 shadow-sm">
            <h3 className="font-mono text-sm font-semibold">{name}</h3>
            {schema.description && <p className="mt-1 text-xs text-ink-muted">{schema.description}</p>}
            <div className="mt-2 overflow-x-auto">
              <Properties schema={schema} />
            </div>
          </article>
        ))}
      </section>
    </div>
  );
}
