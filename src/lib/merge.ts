/**
 * Deep merge of plain JSON objects, later arguments winning; arrays and scalars are replaced,
 * not merged. Used to layer partial policies: defaults < project < case.
 */
export function mergeDeep(...layers: unknown[]): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const layer of layers) {
    if (!isPlainObject(layer)) continue;
    for (const [key, value] of Object.entries(layer)) {
      const current = out[key];
      out[key] = isPlainObject(value) && isPlainObject(current) ? mergeDeep(current, value) : value;
    }
  }
  return out;
}

function isPlainObject(v: unknown): v is Record<string, unknown> {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}
