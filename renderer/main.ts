/**
 * Renderer entry: picks the client (Electron preload bridge when present,
 * else the web host over HTTP and WebSocket) and mounts the views.
 */
import 'uplot/dist/uPlot.min.css';
import './styles.css';
import type { RolloffClient } from '../app/contract/contract';
import { createBridgeClient, type PreloadBridge } from './client/bridge-client';
import { createHttpClient } from './client/http-client';
import { mountShell } from './shell';
import { AppState } from './state';
import { UserError } from '../app/errors';
import { showError, showInfo } from './notices';
import { BenchView } from './views/bench-view';
import { DesignView } from './views/design-view';
import { SweepView } from './views/sweep-view';
import { HistoryView } from './views/history-view';
import { CompareView } from './views/compare-view';
import { RecordView } from './views/record-view';
import { AboutView } from './views/about-view';

const state = new AppState();

/** An event the host sent that did not fit the contract: said once in a notice, not passed to the views. */
const reportRefusedEvent = (error: Error) => showError(error, 'An update from the Rolloff host was ignored');

function chooseClient(): RolloffClient {
  const bridge = (window as unknown as { rolloff?: PreloadBridge }).rolloff;
  if (bridge) return createBridgeClient(bridge, reportRefusedEvent);
  let everConnected = false;
  let lost = false;
  return createHttpClient(new URL('./', location.href), (connected) => {
    if (!connected && everConnected && !lost) {
      lost = true;
      showError(new UserError('Lost the connection to the Rolloff host; trying again…', 'Running sweeps go on in the host. Check that "rolloff serve" is still running.'));
    } else if (connected) {
      if (lost) {
        showInfo('Connected to the Rolloff host again.');
        state.resyncView();
      }
      everConnected = true;
      lost = false;
    }
  }, reportRefusedEvent);
}

const client = chooseClient();
const root = document.getElementById('app')!;
mountShell(root, client, state, [
  new BenchView(client, state),
  new DesignView(client, state),
  new SweepView(client, state),
  new HistoryView(client, state),
  new CompareView(client, state),
  new RecordView(client, state),
  new AboutView(),
]);
