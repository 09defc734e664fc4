/** The password of every person of the invented demo site (README "Demo sign-ins"). */
export const DEMO_PASSWORD = 'brink-demo-2026';
