// A self-contained HTML reference rendered from the OpenAPI document (no scripts, no external assets).

import type { JsonSchemaNode } from "../schemas/json-schema.js";
import { EYE_SAFETY_CAUTION } from "../pipeline/eye-safety.js";
import type { OpenApiDocument, OpenApiResponse } from "./openapi.js";

type Schema = JsonSchemaNode;

function escapeHtml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]!);
}

function typeText(s: Schema): string {
  if (s.const !== undefined) return `= ${JSON.stringify(s.const)}`;
  if (s.enum) return s.enum.map((v) => JSON.stringify(v)).join(" | ");
  const bounds: string[] = [];
  if (s.minimum !== undefined) bounds.push(`≥ ${s.minimum}`);
  if (s.exclusiveMinimum !== undefined) bounds.push(`> ${s.exclusiveMinimum}`);
  if (s.maximum !== undefined) bounds.push(`≤ ${s.maximum}`);
  if (s.exclusiveMaximum !== undefined) bounds.push(`< ${s.exclusiveMaximum}`);
  const t = Array.isArray(s.type) ? s.type.join(" | ") : (s.type ?? (s.oneOf || s.anyOf ? "one of" : "any"));
  return bounds.length ? `${t} (${bounds.join(", ")})` : t;
}

function fieldRows(s: Schema, prefix: string, rows: string[]): void {
  const branches = s.oneOf ?? s.anyOf;
  if (branches) {
    for (const b of branches) {
      const kind = b.properties?.kind?.const;
      fieldRows(b, kind !== undefined ? `${prefix} (kind ${JSON.stringify(kind)})` : prefix, rows);
    }
    return;
  }
  for (const [name, child] of Object.entries(s.properties ?? {})) {
    const path = prefix ? `${prefix}.${name}` : name;
    const def = child.default !== undefined ? escapeHtml(JSON.stringify(child.default).slice(0, 60)) : "";
    rows.push(
      `<tr><td><code>${escapeHtml(path)}</code></td><td>${escapeHtml(typeText(child))}</td><td>${def}</td><td>${escapeHtml(child.description ?? "")}</td></tr>`,
    );
    if (child.properties || child.oneOf || child.anyOf) fieldRows(child, path, rows);
    if (child.items && (child.items.properties || child.items.oneOf)) fieldRows(child.items, `${path}[]`, rows);
  }
}

/** Content types of an answer, each JSON one with the name of its schema under components.schemas. */
function contentText(response: OpenApiResponse): string {
  return Object.entries(response.content)
    .map(([type, media]) => {
      const refs = [media.schema?.$ref, ...(media.schema?.oneOf ?? []).map((s) => s.$ref)].filter((r): r is string => r !== undefined);
      return refs.length ? `${type} (${refs.map((r) => r.replace("#/components/schemas/", "")).join(" or ")})` : type;
    })
    .join(", ");
}

export function renderDocsPage(openapi: OpenApiDocument): string {
  const { info, paths } = openapi;
  const sections: string[] = [];
  for (const [path, methods] of Object.entries(paths)) {
    for (const [method, op] of Object.entries(methods)) {
      const rows: string[] = [];
      const params = op.parameters ?? [];
      for (const p of params) {
        const def = p.schema.default !== undefined ? escapeHtml(JSON.stringify(p.schema.default)) : "";
        rows.push(
          `<tr><td><code>${escapeHtml(p.name)}</code> (${p.in})</td><td>${escapeHtml(typeText(p.schema))}</td><td>${def}</td><td>${escapeHtml(p.description ?? p.schema.description ?? "")}</td></tr>`,
        );
      }
      const json = op.requestBody?.content["application/json"];
      const body = json?.schema;
      const examples = Object.values(json?.examples ?? {})
        .map((e) => `<p>${escapeHtml(e.summary)}</p><pre><code>${escapeHtml(JSON.stringify(e.value))}</code></pre>`)
        .join("");
      if (body) fieldRows(body, "", rows);
      const responses = Object.entries(op.responses)
        .map(([status, r]) => `<li><strong>${status}</strong> ${escapeHtml(r.description)} <small>${escapeHtml(contentText(r))}</small></li>`)
        .join("");
      const id = `${method}-${path}`.replace(/[^a-z0-9]+/gi, "-");
      sections.push(`<section id="${id}">
<h2><span class="method">${method.toUpperCase()}</span> <code>${escapeHtml(path)}</code></h2>
<p>${escapeHtml(String(op.summary ?? ""))}</p>${op.description ? `<p>${escapeHtml(String(op.description))}</p>` : ""}
${rows.length ? `<table><thead><tr><th>field</th><th>type and range</th><th>default</th><th>meaning</th></tr></thead><tbody>${rows.join("")}</tbody></table>` : ""}
<ul>${responses}</ul>${examples ? `
<h3>Examples</h3>${examples}` : ""}
</section>`);
    }
  }
  return `<!doctype html>
<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1">
<title>${escapeHtml(info.title)} ${escapeHtml(info.version)} — API reference</title>
<style>
body{font:15px/1.5 system-ui,sans-serif;max-width:70rem;margin:2rem auto;padding:0 1rem;color:#1d232b}
h1{margin-bottom:.2rem} h2{font-size:1.1rem;border-top:1px solid #ccd;padding-top:1rem}
.method{display:inline-block;min-width:3.5rem;color:#fff;background:#35506b;border-radius:4px;padding:0 .4rem;font-size:.85rem}
table{border-collapse:collapse;width:100%;font-size:.9rem} td,th{border:1px solid #dde;padding:.25rem .5rem;text-align:left;vertical-align:top}
.caution{border-left:4px solid #b4531b;background:#fff4ec;padding:.5rem 1rem}
</style></head><body>
<h1>${escapeHtml(info.title)} <small>${escapeHtml(info.version)}</small></h1>
<p class="caution">${escapeHtml(EYE_SAFETY_CAUTION)}</p>
<p>${escapeHtml(info.description.replace(EYE_SAFETY_CAUTION, "").trim())}</p>
<p>Every error has the JSON shape <code>{ error, message, field, allowed, requestId }</code>. The machine-readable
document is at <a href="/openapi.json">/openapi.json</a>; the schema of every JSON answer is in its
<code>components.schemas</code>, under the name given beside each answer below.</p>
<nav><ul>${Object.entries(paths)
    .flatMap(([p, ms]) =>
      Object.keys(ms).map(
        (m) => `<li><a href="#${`${m}-${p}`.replace(/[^a-z0-9]+/gi, "-")}">${m.toUpperCase()} ${escapeHtml(p)}</a></li>`,
      ),
    )
    .join("")}</ul></nav>
${sections.join("\n")}
</body></html>`;
}
