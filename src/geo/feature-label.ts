/** Names a feature in messages: its number, plus its ID when one is plainly present. */

const ID_LIKE = /^(id|fid|geoid|fips|code)$|(id|code)$/i;

/** "feature 12 (GEOID 39049)" — the ID hint is the GeoJSON `id` member or the first ID-like property. */
export function featureLabel(feature: number, properties: Record<string, unknown> | null | undefined, featureId?: unknown): string {
  const hint = idHint(properties, featureId);
  return hint ? `feature ${feature} (${hint})` : `feature ${feature}`;
}

function idHint(properties: Record<string, unknown> | null | undefined, featureId: unknown): string | null {
  if (isShowable(featureId)) return `id ${String(featureId)}`;
  if (!properties) return null;
  if (isShowable(properties.id)) return `id ${String(properties.id)}`;
  for (const key of Object.keys(properties)) {
    if (ID_LIKE.test(key) && isShowable(properties[key])) return `${key} ${String(properties[key])}`;
  }
  return null;
}

function isShowable(v: unknown): boolean {
  return (typeof v === 'string' && v.trim() !== '' && v.length <= 40) || (typeof v === 'number' && Number.isFinite(v));
}
