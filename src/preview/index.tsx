// TEMPORARY harness until the sandbox lands.
import { FluentProvider } from '@fluentui/react-components';
import { createRoot } from 'react-dom/client';
import { fakeLayer } from '../../test/taskpane/fakeLayer.js';
import { TailmarkPane } from '../taskpane/Pane.js';
import { fluentTheme, pickTheme } from '../taskpane/theme.js';
const layer = fakeLayer(600);
layer.phaseDelay = 300;
createRoot(document.getElementById('root')!).render(
  <FluentProvider theme={fluentTheme(pickTheme(location.search, null))}><div style={{ maxWidth: 360 }}><TailmarkPane layer={layer} /></div></FluentProvider>,
);
