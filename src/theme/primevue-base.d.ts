// @primevue/core ships no types for its registry of loaded style sheets; these are the members Kinefold uses.
declare module '@primevue/core/base' {
  const Base: {
    clearLoadedStyleNames(): void;
  };
  export default Base;
}
