import { Column, Entity, PrimaryColumn } from 'typeorm';

/** A Stripe event already processed; its id as primary key makes replays no-ops. */
@Entity({ name: 'webhook_events' })
export class WebhookEvent {
  @PrimaryColumn({ type: 'text' }) id!: string;
  @Column({ type: 'text' }) type!: string;
  @Column({ name: 'received_at', type: 'timestamptz', default: () => 'now()' }) receivedAt!: Date;
}
