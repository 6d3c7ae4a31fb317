/**
 * The client's URLs: every survey and revision has a stable address a colleague can open.
 *   /surveys/:id                      the survey at its latest revision
 *   /surveys/:id/revisions/:n         revision n
 *   /surveys/:id/revisions/:n/report  the printable report of revision n
 * The server answers each of these paths with the client's page (server/routes/client-pages.ts).
 */

export interface Route {
  readonly surveyId: string | null;
  readonly revision: number | null;
  readonly report: boolean;
}

export function parseRoute(pathname: string): Route {
  const match = /^\/surveys\/([0-9A-Za-z_-]{1,64})(?:\/revisions\/([1-9]\d{0,8})(\/report)?)?\/?$/.exec(pathname);
  if (!match) return { surveyId: null, revision: null, report: false };
  return { surveyId: match[1]!, revision: match[2] ? Number(match[2]) : null, report: match[3] !== undefined };
}

export const paths = {
  survey: (id: string) => `/surveys/${id}`,
  revision: (id: string, number: number) => `/surveys/${id}/revisions/${number}`,
  report: (id: string, number: number) => `/surveys/${id}/revisions/${number}/report`,
};
