// A static single-page app: nothing is rendered on a server.
export const ssr = false;
export const prerender = false;
