import { MikroORM } from '@mikro-orm/postgresql';
import { ormOptions } from '../../../../mikro-orm.config';

let orm: MikroORM | undefined;

/** The one ORM of this process, connected as the app's database role. */
export async function getOrm(url: string): Promise<MikroORM> {
	orm ??= await MikroORM.init(ormOptions(url));
	return orm;
}

export async function closeOrm(): Promise<void> {
	await orm?.close(true);
	orm = undefined;
}
