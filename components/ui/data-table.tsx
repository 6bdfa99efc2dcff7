"use client";

import { Fragment, useId, useState, type HTMLAttributes, type ReactNode } from "react";
import { formatInstant } from "@/components/format/instant";
import { Button } from "@/components/ui/button";
import { UtcCaption } from "@/components/ui/utc-caption";

/** A row's place in the table's one open expansion: whether it is open, how to flip it, the id of what opens. */
export interface RowState {
  expanded: boolean;
  toggle: () => void;
  expansionId: string;
}

export interface Column<T> {
  /** React key of the column, and the cell's `data-cell` (tests and styles find a cell by it). */
  key: string;
  header: ReactNode;
  /** A header read by screen readers only (an actions column). */
  headerHidden?: boolean;
  className?: string | ((row: T) => string | undefined);
  cell: (row: T, state: RowState) => ReactNode;
}

export interface DataTableProps<T> {
  /** The table's accessible name. */
  label: string;
  columns: readonly Column<T>[];
  rows: readonly T[];
  rowKey: (row: T) => string;
  /** What an empty table says, in one full-width row (none for tables that are never empty). */
  empty?: ReactNode;
  /** Attributes of a row's <tr> (a muted class, a data-* id). */
  rowProps?: (row: T) => HTMLAttributes<HTMLTableRowElement> & Partial<Record<`data-${string}`, string>>;
  /** A full-width row under the open row (details read in place); an ExpandButton in a cell opens it. */
  expansion?: (row: T) => ReactNode;
  /** False for tables without instants; otherwise the caption says the times are UTC. */
  utcCaption?: boolean;
  busy?: boolean;
}

// The console's one table: a card that scrolls sideways, dense rows, a header row, an empty-state row.
export function DataTable<T>({ label, columns, rows, rowKey, empty, rowProps, expansion, utcCaption = true, busy }: DataTableProps<T>) {
  const [open, setOpen] = useState<string | null>(null);
  const idBase = useId();
  return (
    <div className="card overflow-x-auto">
      <table className="table-dense" aria-label={label} aria-busy={busy}>
        {utcCaption && <UtcCaption />}
        <thead>
          <tr>
            {columns.map((c) => (
              <th key={c.key} scope="col">
                {c.headerHidden === true ? <span className="sr-only">{c.header}</span> : c.header}
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          {rows.length === 0 && empty !== undefined && (
            <tr>
              <td colSpan={columns.length} className="py-6 text-center text-graphite-muted">
                {empty}
              </td>
            </tr>
          )}
          {rows.map((row) => {
            const key = rowKey(row);
            const state: RowState = { expanded: open === key, toggle: () => setOpen(open === key ? null : key), expansionId: `${idBase}-${key}` };
            return (
              <Fragment key={key}>
                <tr {...rowProps?.(row)}>
                  {columns.map((c) => (
                    <td key={c.key} data-cell={c.key} className={typeof c.className === "function" ? c.className(row) : c.className}>
                      {c.cell(row, state)}
                    </td>
                  ))}
                </tr>
                {state.expanded && expansion !== undefined && (
                  <tr id={state.expansionId}>
                    <td colSpan={columns.length} className="bg-paper-sunk">
                      {expansion(row)}
                    </td>
                  </tr>
                )}
              </Fragment>
            );
          })}
        </tbody>
      </table>
    </div>
  );
}

/** The last column of a table with row actions: a header only screen readers read, buttons at the right. */
export function actionsColumn<T>(actions: (row: T, state: RowState) => ReactNode, header = "Actions"): Column<T> {
  return {
    key: "actions",
    header,
    headerHidden: true,
    className: "whitespace-nowrap text-right",
    cell: (row, state) => <div className="flex justify-end gap-1.5">{actions(row, state)}</div>,
  };
}

/** A cell with an instant and, under it, who caused it (uploaded by, submitted by). */
export function InstantBy({ at, by }: { at: string; by: string }) {
  return (
    <>
      {formatInstant(at, false)}
      <span className="block text-xs text-graphite-muted">{by}</span>
    </>
  );
}

/** The button that opens and closes a row's expansion. */
export function ExpandButton({ state, show, hide }: { state: RowState; show: string; hide: string }) {
  return (
    <Button size="sm" aria-expanded={state.expanded} aria-controls={state.expansionId} onClick={state.toggle}>
      {state.expanded ? hide : show}
    </Button>
  );
}
