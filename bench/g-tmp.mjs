import { groupRows } from '/work/main/dist/src/scoring/groups.js';
const ROWS=1048575, GROUPS=2000;
const names=Array.from({length:GROUPS},(_,g)=>`CC-${1000+g}`);
const keys=new Array(ROWS); for(let r=0;r<ROWS;r++) keys[r]=names[(Math.random()**1.5*GROUPS)|0];
for(let it=0;it<5;it++){
 let t=performance.now(); let m=new Map(); const out=new Int32Array(ROWS);
 for(let r=0;r<ROWS;r++){const c=keys[r]; let g=m.get(c); if(g===undefined){g=m.size;m.set(c,g);} out[r]=g;}
 const t1=performance.now()-t; t=performance.now();
 const start=new Int32Array(GROUPS+1); for(let r=0;r<ROWS;r++) start[out[r]+1]++; for(let g=0;g<GROUPS;g++) start[g+1]+=start[g];
 const fill=start.slice(0,GROUPS); const rows=new Int32Array(ROWS); for(let r=0;r<ROWS;r++) rows[fill[out[r]]++]=r;
 const t2=performance.now()-t; t=performance.now();
 groupRows([{cells:keys}],ROWS); const t3=performance.now()-t;
 console.log('map',t1.toFixed(1),'csort',t2.toFixed(1),'groupRows',t3.toFixed(1));
}
