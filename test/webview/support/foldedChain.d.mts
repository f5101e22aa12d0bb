export declare const FOLDED_CHAIN_SOURCE: string;
