import { expect, request as newRequest, test, type APIRequestContext } from '@playwright/test';
import sharp from 'sharp';
import { DEMO, DEMO_PASSWORD, signIn } from './support';

const SVG_MESSAGE = /SVG drawings cannot be uploaded/;
const NOT_A_PHOTO = 'This file is not a photo we can read (JPEG, PNG or WebP).';

async function session(baseURL: string, who: keyof typeof DEMO): Promise<APIRequestContext> {
	const ctx = await newRequest.newContext({ baseURL });
	const res = await ctx.post('/signin', {
		form: { email: DEMO[who].email, password: DEMO_PASSWORD, redirectTo: '/' },
		headers: { origin: baseURL, accept: 'text/html' },
		maxRedirects: 0
	});
	expect(res.status(), `${who} signs in`).toBe(302);
	return ctx;
}

const upload = (
	ctx: APIRequestContext,
	baseURL: string,
	purpose: string,
	name: string,
	buffer: Buffer,
	mimeType: string
) =>
	ctx.post('/api/images', {
		multipart: { purpose, file: { name, mimeType, buffer } },
		headers: { origin: baseURL }
	});

const png = (width: number, height: number) =>
	sharp({ create: { width, height, channels: 3, background: '#3a6ea5' } })
		.png()
		.toBuffer();

test.describe('images: upload and serve through object storage', () => {
	let lead: APIRequestContext;
	let tech: APIRequestContext;
	test.beforeAll(async ({ baseURL }) => {
		lead = await session(baseURL!, 'lead');
		tech = await session(baseURL!, 'technician');
	});
	test.afterAll(async () => {
		await lead.dispose();
		await tech.dispose();
	});

	test('demo mode runs its own S3 fake: health is fine and a lead uploads a PNG that comes back as a JPEG', async ({
		baseURL
	}) => {
		expect((await lead.get('/api/health')).status()).toBe(200);
		const res = await upload(lead, baseURL!, 'procedure', 'magnet-orientation.png', await png(800, 600), 'image/png');
		expect(res.status()).toBe(201);
		const body = (await res.json()) as { id: string; url: string; width: number; height: number };
		expect(body.url).toBe(`/images/${body.id}`);
		expect([body.width, body.height]).toEqual([800, 600]);

		const img = await lead.get(body.url);
		expect(img.status()).toBe(200);
		const headers = img.headers();
		expect(headers['content-type']).toBe('image/jpeg');
		expect(headers['x-content-type-options']).toBe('nosniff');
		expect(headers['cache-control']).toMatch(/^private, max-age=\d+$/);
		const bytes = await img.body();
		expect([...bytes.subarray(0, 3)]).toEqual([0xff, 0xd8, 0xff]);
		expect(Number(headers['content-length'])).toBe(bytes.byteLength);
		const meta = await sharp(bytes).metadata();
		expect([meta.width, meta.height]).toEqual([800, 600]);

		// Any signed-in role reads it; the ETag saves a second download.
		const again = await tech.get(body.url, { headers: { 'if-none-match': headers['etag'] } });
		expect(again.status()).toBe(304);
	});

	test('an anonymous visitor is sent to sign-in, and gets 401 from the upload API', async ({ baseURL }) => {
		const res = await upload(lead, baseURL!, 'procedure', 'a.png', await png(20, 20), 'image/png');
		const { url } = (await res.json()) as { url: string };
		const anon = await newRequest.newContext({ baseURL });
		const get = await anon.get(url, { maxRedirects: 0 });
		expect(get.status()).toBe(303);
		expect(get.headers()['location']).toMatch(/^\/signin\?redirectTo=/);
		const post = await upload(anon, baseURL!, 'intake', 'a.png', await png(20, 20), 'image/png');
		expect(post.status()).toBe(401);
		await anon.dispose();
	});

	test('a technician may add an intake photo but not a procedure image', async ({ baseURL }) => {
		const refused = await upload(tech, baseURL!, 'procedure', 'bore.png', await png(40, 40), 'image/png');
		expect(refused.status()).toBe(403);
		const intake = await upload(tech, baseURL!, 'intake', 'unit-as-received.png', await png(40, 40), 'image/png');
		expect(intake.status()).toBe(201);
	});

	test('an SVG, a text file named .png and an oversized file are refused with their own message', async ({
		baseURL
	}) => {
		const svg = Buffer.from('<svg xmlns="http://www.w3.org/2000/svg"><script>alert(1)</script></svg>');
		const svgRes = await upload(lead, baseURL!, 'procedure', 'diagram.png', svg, 'image/png');
		expect(svgRes.status()).toBe(415);
		expect(((await svgRes.json()) as { message: string }).message).toMatch(SVG_MESSAGE);

		const text = await upload(lead, baseURL!, 'procedure', 'photo.png', Buffer.from('torque 10 N·m'), 'image/png');
		expect(text.status()).toBe(415);
		expect(await text.json()).toEqual({ message: NOT_A_PHOTO });

		const huge = await upload(
			lead,
			baseURL!,
			'procedure',
			'huge.jpg',
			Buffer.alloc(10 * 1024 * 1024 + 1),
			'image/jpeg'
		);
		expect(huge.status()).toBe(413);
		expect(((await huge.json()) as { message: string }).message).toMatch(/larger than 10 MB/);

		const empty = await upload(lead, baseURL!, 'elsewhere', 'a.png', await png(8, 8), 'image/png');
		expect(empty.status()).toBe(400);
	});

	test('an uploaded picture shows in a signed-in page (the page CSP allows it)', async ({ page, baseURL }) => {
		const res = await upload(lead, baseURL!, 'procedure', 'p.png', await png(120, 90), 'image/png');
		const { url } = (await res.json()) as { url: string };
		await signIn(page, DEMO.lead.email);
		await page.waitForURL(/\/library/);
		const width = await page.evaluate(async (src) => {
			const img = document.createElement('img');
			img.src = src;
			document.body.append(img);
			await img.decode();
			return img.naturalWidth;
		}, url);
		expect(width).toBe(120);
	});
});
