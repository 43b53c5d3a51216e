/**
 * What the host does with each message from a panel (already checked by the protocol's
 * guard in PanelView): one case per message type, each handed to the file's session.
 */
import { unreachable, type PanelMessage } from '../core/protocol';
import { revealLine } from './reveal';
import type { DataSession } from './session';

/** Handles one message from the panel of `session`. */
export function routePanelMessage(session: DataSession, m: PanelMessage): void {
  const r = session.result;
  switch (m.type) {
    case 'ready':
      return;
    case 'needDetail':
      session.sendDetail(m.runId, m.df);
      return;
    case 'choice':
      if (r && m.runId === r.runId) session.rule = m.rule;
      return;
    case 'save':
      void session.saveFromPanel(m.requestId, m.runId, m.rule, false);
      return;
    case 'refitAndSave':
      void session.saveFromPanel(m.requestId, m.runId, m.rule, true);
      return;
    case 'revealLine':
      void revealLine(session.uri, m.line, session.panelColumn);
      return;
    case 'rerun':
      void session.tune({ reason: 'asked' });
      return;
    case 'stop':
      session.stop();
      return;
    case 'model':
      if (r && m.runId === r.runId) session.switchModel(m.model);
      return;
    case 'inverseTable':
      void session.setInverseSaved(m.save);
      return;
    case 'candidates':
      if (r && m.runId === r.runId) session.widenCandidates(m.candidates);
      return;
    case 'selectGroup':
      session.selectGroup(m.setId, m.group);
      return;
    case 'surfaceSlices':
      session.surfaceMessage(m.runId, { slices: { input: m.input, at: m.at } });
      return;
    case 'surfacePair':
      session.surfaceMessage(m.runId, { pair: { x: m.x, x2: m.x2 } });
      return;
    case 'surfaceRule':
      session.surfaceMessage(m.runId, { pair: 'rule' });
      return;
    case 'surfaceSave':
      void session.saveSurfaceFromPanel(m.requestId, m.runId);
      return;
    default:
      unreachable(m);
  }
}
