/** Small DOM helpers: build elements declaratively, empty a node. No framework: the client is thin. */

type Child = Node | string | number | null | undefined | false;
type Attributes = Record<string, string | number | boolean | null | undefined | EventListener>;

/**
 * `h('button', { class: 'primary', onclick: save }, 'Save')`: an element with attributes (a
 * function under an `on…` key becomes an event listener; `true` sets a boolean attribute; `false`,
 * `null` and `undefined` leave it out) and children (strings become text, never HTML).
 */
export function h<K extends keyof HTMLElementTagNameMap>(tag: K, attributes: Attributes = {}, ...children: Child[]): HTMLElementTagNameMap[K] {
  const element = document.createElement(tag);
  for (const [name, value] of Object.entries(attributes)) {
    if (value === false || value === null || value === undefined) continue;
    if (typeof value === 'function') element.addEventListener(name.replace(/^on/, ''), value);
    else if (value === true) element.setAttribute(name, '');
    else element.setAttribute(name, String(value));
  }
  append(element, ...children);
  return element;
}

export function append(parent: Node, ...children: Child[]): void {
  for (const child of children) {
    if (child === null || child === undefined || child === false) continue;
    parent.appendChild(typeof child === 'object' ? child : document.createTextNode(String(child)));
  }
}

/** Replace every child of `parent` with `children`. */
export function replaceChildren(parent: Element, ...children: Child[]): void {
  parent.replaceChildren();
  append(parent, ...children);
}

/** Attributes that name a control across re-renders (besides its id). */
const CONTROL_KEYS = ['data-assign', 'data-drag-mode', 'data-shot-toggle', 'data-view'] as const;

/**
 * Run `render` (which rebuilds `container`'s children) and give the keyboard focus back to the
 * control that had it, found again by id or by one of `CONTROL_KEYS`: a keyboard user stays where
 * they were instead of being sent back to the top of the page.
 */
export function keepingFocus(container: Element, render: () => void): void {
  const active = document.activeElement;
  let selector: string | null = null;
  if (active instanceof HTMLElement && container.contains(active)) {
    if (active.id) selector = `#${CSS.escape(active.id)}`;
    else {
      const key = CONTROL_KEYS.find((name) => active.hasAttribute(name));
      if (key) selector = `[${key}="${CSS.escape(active.getAttribute(key) ?? '')}"]`;
    }
  }
  render();
  if (selector) container.querySelector<HTMLElement>(selector)?.focus();
}
