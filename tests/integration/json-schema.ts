// A small checker for the part of JSON Schema the OpenAPI document uses (type, required,
// properties, items, enum, $ref to components.schemas). Returns every mismatch with its path.
type Schema = Record<string, any>;

export function schemaProblems(value: unknown, schema: Schema, components: Record<string, Schema>, path = "$"): string[] {
  if (schema.$ref) {
    const name = String(schema.$ref).replace("#/components/schemas/", "");
    const target = components[name];
    if (!target) return [`${path}: unknown schema ${schema.$ref}`];
    return schemaProblems(value, target, components, path);
  }
  const problems: string[] = [];
  if (schema.type) {
    const types: string[] = Array.isArray(schema.type) ? schema.type : [schema.type];
    if (!types.some((t) => matchesType(value, t))) return [`${path}: expected ${types.join(" or ")}, got ${JSON.stringify(value)?.slice(0, 60)}`];
  }
  if (schema.enum && !schema.enum.includes(value)) problems.push(`${path}: ${JSON.stringify(value)} is not one of ${schema.enum.join(", ")}`);
  if (value && typeof value === "object" && !Array.isArray(value)) {
    const obj = value as Record<string, unknown>;
    for (const key of schema.required ?? []) if (!(key in obj)) problems.push(`${path}.${key}: required, missing`);
    for (const [key, sub] of Object.entries<Schema>(schema.properties ?? {})) {
      if (key in obj && obj[key] !== undefined) problems.push(...schemaProblems(obj[key], sub, components, `${path}.${key}`));
    }
  }
  if (Array.isArray(value) && schema.items) value.forEach((v, i) => problems.push(...schemaProblems(v, schema.items, components, `${path}[${i}]`)));
  return problems;
}

function matchesType(value: unknown, type: string): boolean {
  switch (type) {
    case "null":
      return value === null;
    case "integer":
      return Number.isInteger(value);
    case "number":
      return typeof value === "number";
    case "array":
      return Array.isArray(value);
    case "object":
      return typeof value === "object" && value !== null && !Array.isArray(value);
    default:
      return typeof value === type;
  }
}
