// Starts every local stand-in for a hosted service on loopback (OpenID Connect, SMTP catcher + mail viewer, Stripe).
// Used by the start and test scripts only; production talks to the real services.
import { startOAuthStandIn } from './oauth.js';
import { startMailCatcher } from './mail.js';
import { startStripeStandIn } from './stripe.js';

const running = await Promise.all([startOAuthStandIn(), startMailCatcher(), startStripeStandIn()]);
console.log('stand-ins ready');

async function stop(): Promise<void> {
  await Promise.allSettled(running.map((service) => service.close()));
  process.exit(0);
}
process.on('SIGINT', () => void stop());
process.on('SIGTERM', () => void stop());
