/** Messages: all in the Messages tab (newest first), errors of an action also beside its controls. */
import { el, byId } from './dom.ts';
import { app } from './appState.ts';

/** Log a message (a warning or error repeated at once is kept once). */
export function say(text: string, kind: 'info' | 'error' | 'warning' = 'info') {
  if (kind !== 'info' && app.messages[0] === `${kind}: ${text}`) return;
  const box = byId('messages');
  const p = el('p', { class: kind, text });
  box.prepend(p);
  while (box.childElementCount > 12) box.lastElementChild!.remove();
  app.messages.unshift(`${kind}: ${text}`);
}
/** Show a message beside the controls of the action that raised it (replacing the last one there), and log it. */
export function notice(where: 'transport-notice' | 'toolbar-notice', text: string, kind: 'error' | 'warning' | 'info' = 'error') {
  const box = byId(where);
  box.textContent = text;
  box.className = `notice ${kind}`;
  box.hidden = false;
  say(text, kind);
}
export function clearNotice(where: 'transport-notice' | 'toolbar-notice') {
  byId(where).hidden = true;
}

/** Empty the set-up problems under the form. */
export function clearProblems() {
  byId('problems').replaceChildren();
  app.problems = [];
}

