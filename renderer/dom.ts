/** A small element builder: views build DOM directly, with no framework. */

type Child = Node | string | number | null | undefined | false;
type Attributes = Record<string, string | number | boolean | undefined | null | EventListener>;

export function h<K extends keyof HTMLElementTagNameMap>(tag: K, attributes: Attributes = {}, ...children: Array<Child | Child[]>): HTMLElementTagNameMap[K] {
  const element = document.createElement(tag);
  for (const [name, value] of Object.entries(attributes)) {
    if (value === undefined || value === null || value === false) continue;
    if (typeof value === 'function') element.addEventListener(name.replace(/^on/, '').toLowerCase(), value);
    else if (name === 'className') element.className = String(value);
    else if (value === true) element.setAttribute(name, '');
    else element.setAttribute(name, String(value));
  }
  append(element, children);
  return element;
}

export function append(parent: Node, children: Array<Child | Child[]>): void {
  for (const child of children.flat()) {
    if (child === null || child === undefined || child === false) continue;
    parent.appendChild(typeof child === 'object' ? child : document.createTextNode(String(child)));
  }
}

export function replaceChildren(parent: Element, ...children: Array<Child | Child[]>): void {
  parent.textContent = '';
  append(parent, children);
}

/** A labelled form field; the label's `for` ties it to the input for screen readers and clicks. */
export function field(label: string, input: HTMLElement, help?: string): HTMLElement {
  if (!input.id) input.id = `field-${label.toLowerCase().replace(/[^a-z0-9]+/g, '-')}-${++fieldCounter}`;
  return h('div', { className: 'field' }, h('label', { for: input.id }, label), input, help ? h('small', { className: 'help' }, help) : null);
}
let fieldCounter = 0;

export function select(options: Array<{ value: string; label: string }>, selected?: string, attributes: Attributes = {}): HTMLSelectElement {
  const element = h('select', attributes);
  for (const option of options) {
    const node = h('option', { value: option.value }, option.label);
    if (option.value === selected) node.selected = true;
    element.appendChild(node);
  }
  return element;
}

export function debounce<A extends unknown[]>(fn: (...args: A) => void, waitMs: number): (...args: A) => void {
  let timer: ReturnType<typeof setTimeout> | undefined;
  return (...args: A) => {
    if (timer !== undefined) clearTimeout(timer);
    timer = setTimeout(() => fn(...args), waitMs);
  };
}
