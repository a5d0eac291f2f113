/** The one way a revision number is written on every page, report and mail: "rev 3" ("rev —" where the number is unknown). */
export const revisionLabel = (revision: number | string | null): string => `rev ${revision ?? '—'}`;
