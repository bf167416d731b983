/**
 * A small JSON Schema (2020-12) checker for the keywords our schema files use:
 * type, const, required, properties, additionalProperties (false), items
 * (schema or false), prefixItems, minItems, maxItems, minimum, maximum.
 * Returns the first problem as "path: message", or null. Test-only; it
 * refuses keywords it does not know so that a schema cannot silently outgrow it.
 */
const KNOWN = new Set(['$schema', '$id', 'title', 'description', 'type', 'const', 'required', 'properties', 'additionalProperties', 'items', 'prefixItems', 'minItems', 'maxItems', 'minimum', 'maximum']);

export function checkAgainstSchema(value: unknown, schema: Record<string, unknown> | boolean, path = '$'): string | null {
  if (schema === false) return `${path}: not allowed`;
  if (schema === true) return null;
  for (const key of Object.keys(schema)) if (!KNOWN.has(key)) throw new Error(`mini schema checker does not know keyword ${key}`);
  if ('const' in schema && JSON.stringify(value) !== JSON.stringify(schema['const'])) return `${path}: expected ${JSON.stringify(schema['const'])}`;
  const type = schema['type'];
  if (type === 'object') {
    if (typeof value !== 'object' || value === null || Array.isArray(value)) return `${path}: expected object`;
    const record = value as Record<string, unknown>;
    for (const key of (schema['required'] as string[] | undefined) ?? []) if (!(key in record)) return `${path}: missing ${key}`;
    const properties = (schema['properties'] as Record<string, Record<string, unknown>> | undefined) ?? {};
    for (const [key, child] of Object.entries(record)) {
      if (key in properties) {
        const problem = checkAgainstSchema(child, properties[key]!, `${path}.${key}`);
        if (problem) return problem;
      } else if (schema['additionalProperties'] === false) return `${path}: unexpected property ${key}`;
    }
  } else if (type === 'array') {
    if (!Array.isArray(value)) return `${path}: expected array`;
    if (typeof schema['minItems'] === 'number' && value.length < schema['minItems']) return `${path}: too few items`;
    if (typeof schema['maxItems'] === 'number' && value.length > schema['maxItems']) return `${path}: too many items`;
    const prefix = (schema['prefixItems'] as Array<Record<string, unknown>> | undefined) ?? [];
    for (let i = 0; i < value.length; i++) {
      const itemSchema = i < prefix.length ? prefix[i]! : (schema['items'] as Record<string, unknown> | boolean | undefined) ?? true;
      const problem = checkAgainstSchema(value[i], itemSchema, `${path}[${i}]`);
      if (problem) return problem;
    }
  } else if (type === 'number' || type === 'integer') {
    if (typeof value !== 'number' || !Number.isFinite(value)) return `${path}: expected a finite number`;
    if (type === 'integer' && !Number.isInteger(value)) return `${path}: expected an integer`;
    if (typeof schema['minimum'] === 'number' && value < schema['minimum']) return `${path}: below minimum`;
    if (typeof schema['maximum'] === 'number' && value > schema['maximum']) return `${path}: above maximum`;
  } else if (type === 'string' && typeof value !== 'string') return `${path}: expected string`;
  return null;
}
