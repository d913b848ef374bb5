// Who may read which message in the local mail reader.
import { describe, expect, it } from 'vitest';
import { mayRead, type FakeMessage, type InboxViewer } from './fake-inbox';

const viewer: InboxViewer = {
	email: 'Owner@A.example',
	shopId: 'shop-a',
	shopAddresses: new Set(['owner@a.example', 'engineer@a.example', 'customer@c.example', 'newcomer@n.example'])
};
const msg = (to: string[], kind?: string, shopId?: string): FakeMessage => ({ id: 'x', receivedAt: '', from: '', to, subject: '', text: '', html: '', kind, shopId });

describe('mayRead', () => {
	it('lets the viewer read their own sign-in link and reset, whatever the case of the address', () => {
		expect(mayRead(msg(['owner@a.example'], 'sign_in_link'), viewer)).toBe(true);
		expect(mayRead(msg(['OWNER@a.example'], 'password_reset'), viewer)).toBe(true);
	});

	it('never shows another account’s sign-in link, reset, unknown or unmarked mail', () => {
		expect(mayRead(msg(['engineer@a.example'], 'sign_in_link'), viewer)).toBe(false);
		expect(mayRead(msg(['engineer@a.example'], 'password_reset', 'shop-a'), viewer)).toBe(false);
		expect(mayRead(msg(['engineer@a.example'], 'shop_sign_up', 'shop-a'), viewer)).toBe(false);
		expect(mayRead(msg(['engineer@a.example']), viewer)).toBe(false);
		expect(mayRead(msg(['owner@a.example', 'engineer@a.example'], 'sign_in_link'), viewer)).toBe(false);
	});

	it('shows the current shop’s invitations and reports to its own people only', () => {
		expect(mayRead(msg(['customer@c.example'], 'head_report', 'shop-a'), viewer)).toBe(true);
		expect(mayRead(msg(['newcomer@n.example'], 'invitation', 'shop-a'), viewer)).toBe(true);
		expect(mayRead(msg(['stranger@s.example'], 'head_report', 'shop-a'), viewer)).toBe(false);
		expect(mayRead(msg(['customer@c.example', 'stranger@s.example'], 'head_report', 'shop-a'), viewer)).toBe(false);
		expect(mayRead(msg(['customer@c.example'], 'head_report', 'shop-b'), viewer)).toBe(false);
		expect(mayRead(msg(['customer@c.example'], 'head_report'), viewer)).toBe(false);
		expect(mayRead(msg([], 'head_report', 'shop-a'), viewer)).toBe(false);
	});
});
