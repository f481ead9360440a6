// Types for what the TypeScript checker cannot read itself: Svelte components and their runes
// inside .svelte.ts modules (the Svelte compiler checks those when it builds the app).
declare module '*.svelte' {
  import type { Component } from 'svelte';
  const component: Component<Record<string, unknown>>;
  export default component;
}
declare function $state<T>(initial: T): T;
declare function $state<T>(): T | undefined;
declare namespace $state {
  function snapshot<T>(value: T): T;
}
declare module '*.css' {}
