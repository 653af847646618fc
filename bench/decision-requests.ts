// The decision run's requests for autocannon: per loop a client accepts its finding and then rejects it (with the
// comment a reject needs), each time naming the version it last saw. A client takes a sheet of its own when its
// loop starts and gives it back when the loop ends, so no two clients decide one finding and a 409 would be a
// real error. autocannon keeps `context` per connection and clears it when the loop starts again.

export interface BenchSheet {
  inspectionId: number;
  findingId: number;
}

interface Context {
  sheet?: BenchSheet;
}

interface Request {
  path: string;
  body?: string;
}

export function decisionRequests(sheets: BenchSheet[], headers: Record<string, string>) {
  const free = [...sheets];
  const versions = new Map<number, number>();
  const path = (sheet: BenchSheet) => `/api/v1/inspections/${sheet.inspectionId}/findings/${sheet.findingId}/decision`;
  const decide = (decision: object) => (req: Request, context: Context) => {
    const sheet = (context.sheet ??= free.pop() ?? sheets[0]);
    req.path = path(sheet);
    req.body = JSON.stringify({ ...decision, version: versions.get(sheet.findingId) ?? 0 });
    return req;
  };
  const remember = (body: string, context: Context) => {
    const version = (JSON.parse(body || "{}") as { version?: unknown }).version;
    if (context.sheet && typeof version === "number") versions.set(context.sheet.findingId, version);
  };
  const common = { method: "POST", headers: { ...headers, "content-type": "application/json" } };
  return [
    { ...common, setupRequest: decide({ decision: "accepted", reason: "no_defect" }), onResponse: (_status: number, body: string, context: Context) => remember(body, context) },
    {
      ...common,
      setupRequest: decide({ decision: "rejected", reason: "defect", comment: "Hickey in up 2, beside the barcode." }),
      onResponse: (_status: number, body: string, context: Context) => {
        remember(body, context);
        if (context.sheet) free.push(context.sheet);
      },
    },
  ];
}
