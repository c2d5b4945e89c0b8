import { quickselect } from '/work/main/dist/src/scoring/quickselect.js';
const N=524; const G=2000;
const src=new Float64Array(N*G); for(let i=0;i<src.length;i++) src[i]=Math.round(Math.exp(5+0.8*(Math.random()+Math.random()+Math.random()-1.5)*2)*100)/100;
const buf=new Float64Array(N);
function lomuto(a,k,left,right){
  while(right>left){
    const mid=left+((right-left)>>1); let t;
    if(a[mid]<a[left]){t=a[mid];a[mid]=a[left];a[left]=t;}
    if(a[right]<a[left]){t=a[right];a[right]=a[left];a[left]=t;}
    if(a[right]<a[mid]){t=a[right];a[right]=a[mid];a[mid]=t;}
    const p=a[mid]; a[mid]=a[right]; a[right]=p;
    let j=left;
    for(let i=left;i<right;i++){const x=a[i]; const lt=(x<p)|0; a[i]=a[j]; a[j]=x; j+=lt;}
    a[right]=a[j]; a[j]=p;
    if(k<j) right=j-1; else if(k>j) left=j+1; else return;
  }
}
function v2(a,k,left,right){
  while(right>left){
    const mid=left+((right-left)>>1); let t;
    if(a[mid]<a[left]){t=a[mid];a[mid]=a[left];a[left]=t;}
    if(a[right]<a[left]){t=a[right];a[right]=a[left];a[left]=t;}
    if(a[right]<a[mid]){t=a[right];a[right]=a[mid];a[mid]=t;}
    const p=a[mid];
    let j=left;
    for(let i=left;i<=right;i++){const x=a[i]; a[i]=a[j]; a[j]=x; j+=+(x<p);}
    if(k<j){right=j-1;continue;}
    let e=j;
    for(let i=j;i<=right;i++){const x=a[i]; a[i]=a[e]; a[e]=x; e+=+(x<=p);}
    if(k<e) return; left=e;
  }
}
for(let it=0;it<6;it++){
 const r=[];
 for (const f of [quickselect, lomuto, v2]) { let t=performance.now(); let chk=0;
 for(let g=0;g<G;g++){ buf.set(src.subarray(g*N,(g+1)*N)); f(buf,(N-1)>>1,0,N-1); chk+=buf[(N-1)>>1];} r.push((performance.now()-t).toFixed(1)+' '+chk.toFixed(0)); }
 console.log(r.join(' | '));
}
