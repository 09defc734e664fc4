/**
 * The phone view's frame and pages, loaded together as one chunk on the first visit to /field: once
 * the list has opened, a permit opens with no signal even without a service worker (its copy is in
 * IndexedDB and its code is already in memory).
 */
export { FieldLayout } from './components/FieldLayout';
export { FieldPermitPage } from './routes/FieldPermitPage';
export { MyPermitsPage } from './routes/MyPermitsPage';
