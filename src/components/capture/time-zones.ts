/** Every IANA time zone the browser knows, with UTC first (some browsers leave it out of their list). */
export const TIME_ZONES: string[] = ['UTC', ...Intl.supportedValuesOf('timeZone').filter((zone) => zone !== 'UTC')];
