import { escapeXml, formatNumber } from "./scale.js";

/** A table to print: a caption, column headings and rows of cells. */
export interface Table {
  caption: string;
  columns: string[];
  rows: (string | number | boolean | null)[][];
}

function cell(v: unknown): string {
  if (typeof v === "number") return Number.isSafeInteger(v) ? String(v) : formatNumber(v); // counts and indices in full
  if (v === null || v === undefined) return "—";
  if (typeof v === "string" || typeof v === "boolean") return String(v);
  if (Array.isArray(v)) return v.every((x) => typeof x === "number") ? `[${v.map((x) => formatNumber(x as number)).join(", ")}]` : `${v.length} items`;
  if (isPlainObject(v)) {
    const text = Object.entries(v).map(([k, x]) => `${k} ${typeof x === "number" ? formatNumber(x) : x === null || typeof x !== "object" ? String(x) : "…"}`).join(", ");
    return text.length > 120 ? `${text.slice(0, 117)}...` : text;
  }
  return String(v);
}

/** Renders a table as HTML; numbers right-aligned. */
export function tableHtml(t: Table, className = "data"): string {
  const head = `<tr>${t.columns.map((c) => `<th scope="col">${escapeXml(c)}</th>`).join("")}</tr>`;
  const body = t.rows
    .map((r) => `<tr>${r.map((v, i) => (i === 0 ? `<th scope="row">${escapeXml(cell(v))}</th>` : `<td${typeof v === "number" ? ' class="num"' : ""}>${escapeXml(cell(v))}</td>`)).join("")}</tr>`)
    .join("");
  return `<table class="${className}"><caption>${escapeXml(t.caption)}</caption><thead>${head}</thead><tbody>${body}</tbody></table>`;
}

function isPlainObject(v: unknown): v is Record<string, unknown> {
  return typeof v === "object" && v !== null && !Array.isArray(v) && !ArrayBuffer.isView(v);
}

function humanize(key: string): string {
  return key.replace(/([a-z0-9])([A-Z])/g, "$1 $2").replace(/[-_]/g, " ").toLowerCase();
}

/**
 * Turns a metrics object of any shape into tables: its scalar fields into one
 * "metric / value" table; each array of objects into a table with a column
 * per key; each object of objects (a confusion table) into a matrix; each
 * object of scalars into a "name / value" table. Nested deeper than that is
 * summarised in a cell.
 */
export function metricsTables(metrics: unknown, title = "Metrics"): Table[] {
  if (!isPlainObject(metrics)) return [];
  const scalars: (string | number | boolean | null)[][] = [];
  const tables: Table[] = [];
  for (const [key, value] of Object.entries(metrics)) {
    if (value === null || typeof value !== "object") {
      scalars.push([humanize(key), value === undefined ? null : (value as string | number | boolean | null)]);
    } else if (Array.isArray(value) && value.length > 0 && value.every(isPlainObject)) {
      const columns = [...new Set(value.flatMap((row) => Object.keys(row)))];
      tables.push({ caption: humanize(key), columns: columns.map(humanize), rows: value.map((row) => columns.map((c) => flat(row[c]))) });
    } else if (Array.isArray(value) || ArrayBuffer.isView(value)) {
      scalars.push([humanize(key), cell(Array.from(value as ArrayLike<unknown>))]);
    } else if (isPlainObject(value)) {
      const entries = Object.entries(value);
      const rowLike = (v: unknown): boolean => v === null || (isPlainObject(v) && Object.values(v).every((x) => x === null || typeof x !== "object"));
      if (entries.length > 0 && entries.every(([, v]) => rowLike(v)) && entries.some(([, v]) => v !== null)) {
        const columns = [...new Set(entries.flatMap(([, v]) => (v === null ? [] : Object.keys(v as object))))];
        tables.push({ caption: humanize(key), columns: ["", ...columns], rows: entries.map(([k, v]) => [k, ...columns.map((c) => (v === null ? null : flat((v as Record<string, unknown>)[c])))]) });
      } else {
        tables.push({ caption: humanize(key), columns: ["name", "value"], rows: entries.map(([k, v]) => [humanize(k), flat(v)]) });
      }
    }
  }
  if (scalars.length > 0) tables.unshift({ caption: title, columns: ["metric", "value"], rows: scalars });
  return tables;
}

function flat(v: unknown): string | number | boolean | null {
  if (v === null || v === undefined) return null;
  if (typeof v === "string" || typeof v === "number" || typeof v === "boolean") return v;
  return cell(v);
}
