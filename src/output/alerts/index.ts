// Public entry of the alert channels (an edge): messages, channels, dispatcher, state interfaces.
export * from './alert-message.js';
export * from './alert-channel.js';
export * from './alert-state.js';
export * from './channel-registry.js';
export * from './deliver-with-retry.js';
export * from './dispatcher.js';
export * from './log-channel.js';
export { createWebhookChannel, signWebhookBody, SIGNATURE_HEADER } from './webhook-channel.js';
export { createEmailChannel } from './email-channel.js';
export * from './alert-outbox.js';
export * from './delivery-error.js';
