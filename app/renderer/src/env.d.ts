/** Side-effect style imports handled by the bundler (vite). */
declare module '*.css';
