/**
 * Whether mailed links (under `publicUrl`) lead somewhere other than the address a person is using now (`inUse`,
 * the page's origin): scheme, host and port must all match, since each of them changes where a link goes.
 */
export function linksGoElsewhere(publicUrl: string, inUse: string): boolean {
  try {
    return new URL(publicUrl).origin !== new URL(inUse).origin;
  } catch {
    return true;
  }
}
