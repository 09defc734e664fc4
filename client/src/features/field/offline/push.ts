import { api } from '@client/lib/api';
import type { PushKeyAnswer, PushStatusAnswer } from '@shared/schemas/push';

/** Can this browser, here, be told of permits (service worker, Push API, notifications)? */
function pushSupported(): boolean {
  return typeof window !== 'undefined' && 'serviceWorker' in navigator && 'PushManager' in window && 'Notification' in window;
}

/** The service worker's registration, or null when it is not running (development build, plain http on a LAN address). */
async function registration(): Promise<ServiceWorkerRegistration | null> {
  if (!pushSupported()) return null;
  return (await navigator.serviceWorker.getRegistration('/')) ?? null;
}

/** The state of this device's notifications for the person signed in. */
export type PushState = 'unsupported' | 'no-worker' | 'blocked' | 'off' | 'on';

export async function pushState(): Promise<PushState> {
  if (!pushSupported()) return 'unsupported';
  const reg = await registration();
  if (!reg) return 'no-worker';
  if (Notification.permission === 'denied') return 'blocked';
  const sub = await reg.pushManager.getSubscription();
  if (!sub || Notification.permission !== 'granted') return 'off';
  const { subscribed } = await api.get<PushStatusAnswer>(`/api/push/subscription?endpoint=${encodeURIComponent(sub.endpoint)}`);
  return subscribed ? 'on' : 'off';
}

/** The VAPID public key (base64url) as the bytes PushManager.subscribe wants. */
function keyBytes(base64url: string): Uint8Array<ArrayBuffer> {
  const b64 = (base64url + '='.repeat((4 - (base64url.length % 4)) % 4)).replace(/-/g, '+').replace(/_/g, '/');
  const raw = atob(b64);
  const out = new Uint8Array(new ArrayBuffer(raw.length));
  for (let i = 0; i < raw.length; i++) out[i] = raw.charCodeAt(i);
  return out;
}

/**
 * Asks the person's leave to show notifications, subscribes this browser with the server's key
 * (a subscription made with an older key is replaced) and registers it with Brink.
 */
export async function turnPushOn(): Promise<PushState> {
  const reg = await registration();
  if (!reg) return pushSupported() ? 'no-worker' : 'unsupported';
  const permission = await Notification.requestPermission();
  if (permission !== 'granted') return permission === 'denied' ? 'blocked' : 'off';
  const { publicKey } = await api.get<PushKeyAnswer>('/api/push/key');
  const old = await reg.pushManager.getSubscription();
  if (old) await old.unsubscribe().catch(() => false);
  const sub = await reg.pushManager.subscribe({ userVisibleOnly: true, applicationServerKey: keyBytes(publicKey) });
  await api.post('/api/push/subscription', sub.toJSON());
  return 'on';
}

/** Stops Brink telling this device and drops the browser's subscription. */
export async function turnPushOff(): Promise<PushState> {
  const reg = await registration();
  const sub = await reg?.pushManager.getSubscription();
  if (sub) {
    await api.delete(`/api/push/subscription?endpoint=${encodeURIComponent(sub.endpoint)}`);
    await sub.unsubscribe().catch(() => false);
  }
  return 'off';
}

/** On sign-out: the next person on this phone is not told of the last one's permits. */
export async function forgetPushSubscription(): Promise<void> {
  const reg = await registration().catch(() => null);
  const sub = await reg?.pushManager.getSubscription().catch(() => null);
  await sub?.unsubscribe().catch(() => false);
}
