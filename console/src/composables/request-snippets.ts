/**
 * "Copy as": the workbench's request as the equivalent public /v1 call, in curl, TypeScript (the
 * generated client, `createEbullioClient` of openapi/client) and Python (standard library only).
 * The API key is always the placeholder `$EBULLIO_API_KEY` (an environment variable), never a
 * secret: the console does not hold one.
 */

export interface PublicRequest {
  method: string;
  /** The public path with its parameters filled in, e.g. /v1/liquors/sodium-hydroxide/boiling-point. */
  path: string;
  body: unknown;
}

/** The operation's path template and its parameters, for the typed client (`{liquorId}`). */
export interface PathTemplate {
  template: string;
  params: Record<string, string>;
}

export const KEY_VARIABLE = 'EBULLIO_API_KEY';

/** Text for a shell between single quotes. */
function shellQuote(s: string): string {
  return `'${s.replace(/'/g, `'\\''`)}'`;
}

export function curlSnippet(origin: string, req: PublicRequest): string {
  const json = JSON.stringify(req.body, null, 2);
  // A quoted here-document: the body goes to curl exactly as written, no shell escaping needed.
  let marker = 'JSON';
  while (json.split('\n').includes(marker)) marker += '_END';
  return [
    `curl -sS -X ${req.method.toUpperCase()} ${shellQuote(origin + req.path)} \\`,
    `  -H "Authorization: Bearer $${KEY_VARIABLE}" \\`,
    `  -H 'Content-Type: application/json' \\`,
    `  -H 'Accept: application/json' \\`,
    `  --data-binary @- <<'${marker}'`,
    json,
    marker,
  ].join('\n');
}

/** A value as a TypeScript/JavaScript literal (JSON with unquoted identifier keys), indented. */
function tsLiteral(value: unknown, indent: string): string {
  if (Array.isArray(value)) {
    if (value.length === 0) return '[]';
    const inner = value.map((v) => `${indent}  ${tsLiteral(v, `${indent}  `)},`);
    return `[\n${inner.join('\n')}\n${indent}]`;
  }
  if (value !== null && typeof value === 'object') {
    const entries = Object.entries(value as Record<string, unknown>);
    if (entries.length === 0) return '{}';
    const inner = entries.map(([k, v]) => {
      const key = /^[A-Za-z_$][A-Za-z0-9_$]*$/.test(k) ? k : JSON.stringify(k);
      return `${indent}  ${key}: ${tsLiteral(v, `${indent}  `)},`;
    });
    return `{\n${inner.join('\n')}\n${indent}}`;
  }
  if (typeof value === 'string')
    return `'${value.replace(/\\/g, '\\\\').replace(/'/g, "\\'").replace(/\n/g, '\\n')}'`;
  return JSON.stringify(value ?? null);
}

export function typescriptSnippet(origin: string, req: PublicRequest, path: PathTemplate): string {
  const method = req.method.toUpperCase();
  const hasParams = Object.keys(path.params).length > 0;
  const options = [
    ...(hasParams ? [`  params: { path: ${tsLiteral(path.params, '  ')} },`] : []),
    `  body: ${tsLiteral(req.body, '  ')},`,
  ];
  return [
    `import { createEbullioClient } from './openapi/client/index.js';`,
    ``,
    `const apiKey = process.env.${KEY_VARIABLE};`,
    `if (!apiKey) throw new Error('Set ${KEY_VARIABLE} to an API key issued in the Ebullio console');`,
    ``,
    `const ebullio = createEbullioClient({ baseUrl: ${tsLiteral(origin, '')}, apiKey });`,
    ``,
    `const { data, error } = await ebullio.${method}(${tsLiteral(path.template, '')}, {`,
    ...options,
    `});`,
    `if (error) throw new Error(\`\${error.title}: \${error.detail ?? ''}\`);`,
    `console.log(JSON.stringify(data, null, 2));`,
  ].join('\n');
}

/** A JSON value as a Python literal (True/False/None), indented by four. */
function pyLiteral(value: unknown, indent: string): string {
  if (Array.isArray(value)) {
    if (value.length === 0) return '[]';
    const inner = value.map((v) => `${indent}    ${pyLiteral(v, `${indent}    `)},`);
    return `[\n${inner.join('\n')}\n${indent}]`;
  }
  if (value !== null && typeof value === 'object') {
    const entries = Object.entries(value as Record<string, unknown>);
    if (entries.length === 0) return '{}';
    const inner = entries.map(
      ([k, v]) => `${indent}    ${JSON.stringify(k)}: ${pyLiteral(v, `${indent}    `)},`,
    );
    return `{\n${inner.join('\n')}\n${indent}}`;
  }
  if (value === true) return 'True';
  if (value === false) return 'False';
  if (value === null || value === undefined) return 'None';
  // A JSON string or number is a valid Python literal (\uXXXX escapes included).
  return JSON.stringify(value);
}

export function pythonSnippet(origin: string, req: PublicRequest): string {
  return [
    `import json`,
    `import os`,
    `import urllib.error`,
    `import urllib.request`,
    ``,
    `body = ${pyLiteral(req.body, '')}`,
    ``,
    `request = urllib.request.Request(`,
    `    ${JSON.stringify(origin + req.path)},`,
    `    data=json.dumps(body).encode("utf-8"),`,
    `    headers={`,
    `        "Authorization": "Bearer " + os.environ["${KEY_VARIABLE}"],`,
    `        "Content-Type": "application/json",`,
    `        "Accept": "application/json",`,
    `    },`,
    `    method=${JSON.stringify(req.method.toUpperCase())},`,
    `)`,
    `try:`,
    `    with urllib.request.urlopen(request) as response:`,
    `        result = json.load(response)`,
    `except urllib.error.HTTPError as err:`,
    `    problem = json.load(err)`,
    `    raise SystemExit(f"{problem['title']}: {problem.get('detail', '')}")`,
    `print(json.dumps(result, indent=2))`,
  ].join('\n');
}
