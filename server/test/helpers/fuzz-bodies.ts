import fc from 'fast-check';

/** The parts of the OpenAPI document the fuzzer reads. */
export interface OpenApi {
  paths: Record<
    string,
    Record<string, { requestBody?: { content?: Record<string, { schema?: JsonSchema }> } }>
  >;
  components?: { schemas?: Record<string, JsonSchema> };
}

/** A JSON Schema node as the zod → OpenAPI generator writes it (only what is read here). */
export interface JsonSchema {
  $ref?: string;
  type?: string | string[];
  properties?: Record<string, JsonSchema>;
  anyOf?: JsonSchema[];
  oneOf?: JsonSchema[];
  allOf?: JsonSchema[];
}

function resolve(doc: OpenApi, schema: JsonSchema | undefined): JsonSchema {
  let s = schema ?? {};
  for (let i = 0; i < 5 && s.$ref; i++) {
    s = doc.components?.schemas?.[s.$ref.split('/').pop() ?? ''] ?? {};
  }
  return s;
}

/** The top-level fields of a body schema with their JSON types (unions merged). */
function fieldsOf(doc: OpenApi, schema: JsonSchema): Map<string, Set<string>> {
  const fields = new Map<string, Set<string>>();
  const visit = (node: JsonSchema) => {
    const s = resolve(doc, node);
    for (const part of [...(s.anyOf ?? []), ...(s.oneOf ?? []), ...(s.allOf ?? [])]) visit(part);
    for (const [name, prop] of Object.entries(s.properties ?? {})) {
      const p = resolve(doc, prop);
      const types = fields.get(name) ?? new Set<string>();
      const add = (n: JsonSchema) => {
        const r = resolve(doc, n);
        for (const t of ([] as string[]).concat(r.type ?? [])) types.add(t);
        for (const u of [...(r.anyOf ?? []), ...(r.oneOf ?? [])]) add(u);
      };
      add(p);
      fields.set(name, types);
    }
  };
  visit(schema);
  return fields;
}

/**
 * Values outside any contract's expectations: unicode edge cases (NUL, a lone surrogate escape,
 * right-to-left override, zero-width joiner, combining marks, astral-plane emoji), a string over
 * the 100 kB JSON limit's field sizes, numbers at IEEE-754 / JavaScript limits, and
 * prototype-pollution keys (the OWASP prototype pollution cheat sheet names `__proto__`,
 * `constructor` and `prototype`). JSON text, so `__proto__` survives as a real key.
 */
const hostileJson: fc.Arbitrary<string> = fc.oneof(
  fc.constantFrom(
    '"\\u0000"',
    '"\\ud800"',
    '"\\u202e\\u0627\\u0644 RTL"',
    '"a\\u200db"',
    '"e\\u0301\\u0301\\u0301"',
    '"\\ud83e\\uddea\\ud83e\\uddea"',
    '""',
    '"   "',
    `"${'x'.repeat(20_000)}"`,
    '9007199254740993',
    '-9007199254740993',
    '1e308',
    '-1e308',
    '5e-324',
    '-0',
    '2147483648',
    'true',
    'null',
    '[]',
    '{}',
    '{"__proto__":{"polluted":true}}',
    '{"constructor":{"prototype":{"polluted":true}}}',
  ),
  fc.string({ unit: 'binary', maxLength: 40 }).map((v) => JSON.stringify(v)),
  fc
    .double()
    .filter(Number.isFinite)
    .map((v) => JSON.stringify(v)),
  fc.integer().map(String),
);

/** A value of a type the field does not take (the field's declared JSON types). */
function wrongTypeFor(types: Set<string>): fc.Arbitrary<string> {
  const candidates: string[] = [];
  if (!types.has('object')) candidates.push('{"__proto__":{"polluted":true}}');
  if (!types.has('array')) candidates.push('[{"constructor":{"prototype":{"polluted":true}}}]');
  if (!types.has('string')) candidates.push('"\\u0000\\ud800"');
  if (!types.has('number') && !types.has('integer')) candidates.push('1e308');
  if (!types.has('boolean')) candidates.push('false');
  return fc.constantFrom(...(candidates.length ? candidates : ['{"__proto__":null}']));
}

/**
 * `count` JSON bodies for one route, built from its contract's fields: every body has at least
 * one field of the wrong type (so no contract may accept it), the other fields hostile or
 * missing, and extra `__proto__` / `constructor` keys. Deterministic (fixed seed per route).
 */
export function hostileBodies(doc: OpenApi, method: string, path: string, count: number): string[] {
  const openApiPath = path.replace(/:([A-Za-z0-9_]+)/g, '{$1}');
  const schema =
    doc.paths[openApiPath]?.[method.toLowerCase()]?.requestBody?.content?.['application/json']
      ?.schema;
  if (!schema) throw new Error(`no JSON body contract for ${method} ${path}`);
  const fields = [...fieldsOf(doc, resolve(doc, schema))];
  const names = fields.length ? fields.map(([n]) => n) : ['value'];
  const field = fields.length
    ? fc.constantFrom(...fields)
    : fc.constant<[string, Set<string>]>(['value', new Set<string>()]);
  const body = field.chain(([wrongName, wrongTypes]) =>
    fc
      .tuple(
        wrongTypeFor(wrongTypes),
        fc.array(fc.tuple(fc.constantFrom(...names), hostileJson), {
          maxLength: fields.length,
        }),
        fc.boolean(),
      )
      .map(([wrong, others, pollute]) => {
        const parts = new Map<string, string>();
        for (const [name, value] of others) parts.set(name, value);
        parts.set(wrongName, wrong);
        const members = [...parts].map(([k, v]) => `${JSON.stringify(k)}:${v}`);
        if (pollute) members.push('"__proto__":{"isAdmin":true}', '"constructor":{"name":"x"}');
        return `{${members.join(',')}}`;
      }),
  );
  const seed = [...`${method} ${path}`].reduce((h, c) => (h * 31 + c.charCodeAt(0)) | 0, 7);
  return fc.sample(body, { numRuns: count, seed });
}
