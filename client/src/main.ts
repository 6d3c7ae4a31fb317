/**
 * The browser client of slopebreak: the workspace, or the printable report when the address is a
 * revision's `/report`. All computation stays on the server; this page shows and edits.
 */
import './styles.css';
import { renderReport } from './report-page.js';
import { parseRoute } from './routes.js';
import { Workspace } from './workspace.js';

const root = document.getElementById('app');
if (root) {
  const route = parseRoute(location.pathname);
  if (route.report && route.surveyId !== null && route.revision !== null) void renderReport(root, route.surveyId, route.revision);
  else void new Workspace(root).start();
}
