import { act, type ReactElement, type ReactNode } from 'react';
import { createRoot, type Root } from 'react-dom/client';
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { fireEvent, within } from '@testing-library/dom';

// The app renders through react-native-web to the DOM, so tests drive real DOM nodes:
// queries by role, label and text from @testing-library/dom, every update inside act().

(globalThis as { IS_REACT_ACT_ENVIRONMENT?: boolean }).IS_REACT_ACT_ENVIRONMENT = true;

export function testQueryClient(): QueryClient {
  // gcTime Infinity: no cache timers left running to keep Jest alive.
  return new QueryClient({ defaultOptions: { queries: { retry: false, gcTime: Infinity }, mutations: { retry: false } } });
}

export interface Rendered {
  container: HTMLElement;
  view: ReturnType<typeof within>;
  client: QueryClient;
  rerender(ui: ReactElement): void;
  unmount(): void;
}

const mounted: Root[] = [];
afterEach(() => {
  while (mounted.length) {
    const root = mounted.pop()!;
    act(() => root.unmount());
  }
  document.body.innerHTML = '';
});

export function render(ui: ReactElement, client = testQueryClient()): Rendered {
  const container = document.createElement('div');
  document.body.appendChild(container);
  const root = createRoot(container);
  mounted.push(root);
  const wrap = (node: ReactNode) => <QueryClientProvider client={client}>{node}</QueryClientProvider>;
  act(() => root.render(wrap(ui)));
  return {
    container,
    view: within(container),
    client,
    rerender: (next) => act(() => root.render(wrap(next))),
    unmount: () => act(() => root.unmount()),
  };
}

export function press(el: Element): void {
  // react-native-web's Pressable answers to the pointer sequence of a real click.
  act(() => {
    fireEvent.pointerDown(el, { pointerId: 1, button: 0, pointerType: 'mouse' });
    fireEvent.pointerUp(el, { pointerId: 1, button: 0, pointerType: 'mouse' });
    fireEvent.click(el);
  });
}

export function type(el: Element, value: string): void {
  act(() => {
    fireEvent.change(el, { target: { value } });
  });
}

/** Lets pending promises (mocked fetches, query updates) settle inside act. */
export async function settle(times = 5): Promise<void> {
  for (let i = 0; i < times; i++) {
    await act(async () => {
      await new Promise((r) => setTimeout(r, 0));
    });
  }
}
