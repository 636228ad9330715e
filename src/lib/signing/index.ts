/** Pure signing rules shared by the bench (browser) and the server: the PIN attempt policy. */
export * from './pin-lockout';
export * from './offline-grant';
