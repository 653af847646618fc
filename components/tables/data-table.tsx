"use client";
// The one table of Tympan's lists (TanStack Table for the column model; sorting and pages are the server's):
// sortable column headers as buttons with aria-sort, a loading line, an empty state, an error state with a
// retry, and a pager. The caller keeps sort and page in the URL.
import { tableFeatures, useTable, type ColumnDef, type RowData } from "@tanstack/react-table";
import { quietButtonClass } from "@/components/ui/field";

export const features = tableFeatures({});
export type Columns<T extends RowData> = ColumnDef<typeof features, T, any>[]; // eslint-disable-line @typescript-eslint/no-explicit-any

interface Props<T extends RowData> {
  label: string;
  columns: Columns<T>;
  rows: T[] | undefined;
  rowKey: (row: T) => string;
  /** Column ids the server can sort by. */
  sortable: readonly string[];
  sort: string;
  dir: "asc" | "desc";
  onSort: (column: string, dir: "asc" | "desc") => void;
  page: number;
  pageSize: number;
  total: number;
  onPage: (page: number) => void;
  loading: boolean;
  error: Error | null;
  onRetry: () => void;
  empty: React.ReactNode;
  /** Column ids hidden on a narrow screen (a 768 px tablet keeps what matters at the press). */
  wideOnly?: readonly string[];
}

const noRows: never[] = [];

export function DataTable<T extends RowData>(props: Props<T>) {
  const table = useTable({ features, columns: props.columns, data: props.rows ?? noRows, getRowId: props.rowKey });
  const pages = Math.max(1, Math.ceil(props.total / props.pageSize));
  const hide = (id: string) => (props.wideOnly?.includes(id) ? "hidden lg:table-cell" : "");
  const first = props.total === 0 ? 0 : (props.page - 1) * props.pageSize + 1;
  const last = Math.min(props.total, props.page * props.pageSize);
  return (
    <div className="space-y-3">
      <div className="overflow-x-auto rounded-xl border border-rule bg-surface shadow-sm">
        <table className="w-full text-left text-sm" aria-label={props.label} aria-busy={props.loading}>
          <thead className="border-b border-rule bg-paper/60 text-xs uppercase tracking-wide text-ink-muted">
            {table.getHeaderGroups().map((group) => (
              <tr key={group.id}>
                {group.headers.map((header) => {
                  const id = header.column.id;
                  const sorted = props.sort === id ? props.dir : null;
                  const canSort = props.sortable.includes(id);
                  return (
                    <th
                      key={header.id}
                      scope="col"
                      aria-sort={sorted === "asc" ? "ascending" : sorted === "desc" ? "descending" : undefined}
                      className={`px-4 py-3 font-medium ${hide(id)}`}
                    >
                      {canSort ? (
                        <button
                          type="button"
                          className="inline-flex items-center gap-1 uppercase tracking-wide hover:text-ink"
                          onClick={() => props.onSort(id, sorted === "asc" ? "desc" : "asc")}
                        >
                          <table.FlexRender header={header} />
                          <span aria-hidden="true" className="text-[10px]">
                            {sorted === "asc" ? "▲" : sorted === "desc" ? "▼" : "↕"}
                          </span>
                        </button>
                      ) : (
                        <table.FlexRender header={header} />
                      )}
                    </th>
                  );
                })}
              </tr>
            ))}
          </thead>
          <tbody className="divide-y divide-rule">
            {table.getRowModel().rows.map((row) => (
              <tr key={row.id} className="hover:bg-paper/60">
                {row.getAllCells().map((cell) => (
                  <td key={cell.id} className={`px-4 py-3 align-top ${hide(cell.column.id)}`}>
                    <table.FlexRender cell={cell} />
                  </td>
                ))}
              </tr>
            ))}
          </tbody>
        </table>
        {props.loading && !props.rows && (
          <p role="status" className="px-4 py-8 text-center text-sm text-ink-muted">
            Loading…
          </p>
        )}
        {props.error && (
          <div role="alert" className="flex flex-wrap items-center justify-center gap-3 px-4 py-8 text-sm text-danger">
            {props.error.message}
            <button type="button" className={quietButtonClass} onClick={props.onRetry}>
              Try again
            </button>
          </div>
        )}
        {props.rows && props.rows.length === 0 && !props.error && <div className="px-4 py-10 text-center text-sm text-ink-muted">{props.empty}</div>}
      </div>
      <nav aria-label={`${props.label}, pages`} className="flex flex-wrap items-center justify-between gap-3 text-sm text-ink-muted">
        <span aria-live="polite">{props.total === 0 ? "Nothing to show" : `${first}–${last} of ${props.total}`}</span>
        <span className="flex items-center gap-2">
          <button type="button" className={quietButtonClass} disabled={props.page <= 1} onClick={() => props.onPage(props.page - 1)}>
            Previous
          </button>
          <span>
            Page {Math.min(props.page, pages)} of {pages}
          </span>
          <button type="button" className={quietButtonClass} disabled={props.page >= pages} onClick={() => props.onPage(props.page + 1)}>
            Next
          </button>
        </span>
      </nav>
    </div>
  );
}
