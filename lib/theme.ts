/**
 * The theme choice kept in the browser, shared by the root layout's head script and the theme switch. A plain
 * module on purpose: a value exported from a 'use client' module reaches a server component as a client
 * reference, not as its text, so the head script would wait on that module's chunk while the page hydrates.
 */

/** localStorage key of the saved theme ('light' | 'dark'; absent = follow the device). */
export const THEME_STORAGE_KEY = 'gp-theme';

/** Inline script for <head>: applies a saved theme before the first paint. */
export const THEME_SCRIPT = `try{var t=localStorage.getItem('${THEME_STORAGE_KEY}');if(t==='light'||t==='dark')document.documentElement.setAttribute('data-theme',t)}catch(e){}`;
